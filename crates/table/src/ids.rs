//! Index newtypes for the rows, columns, inputs and outputs of a flow table.
//!
//! Each is a `Copy` wrapper over `u32`, 0-based, converted with [`index`](StateId::index)
//! and [`from_index`](StateId::from_index). Names and labels live in the
//! [`FlowTable`](crate::FlowTable); ask it for the human form.

macro_rules! id_type {
    ($(#[$doc:meta])* $name:ident) => {
        $(#[$doc])*
        #[derive(Copy, Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
        #[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
        #[cfg_attr(feature = "serde", serde(transparent))]
        pub struct $name(u32);

        impl $name {
            /// The 0-based index.
            #[inline]
            pub fn index(self) -> usize {
                self.0 as usize
            }

            /// The id with this 0-based index.
            ///
            /// # Panics
            /// If `i` does not fit in a `u32` (tables are far smaller: see the limits in
            /// [`crate::limits`]).
            #[inline]
            pub fn from_index(i: usize) -> Self {
                $name(u32::try_from(i).expect("index fits in u32"))
            }
        }

        impl std::fmt::Display for $name {
            fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
                write!(f, "{}", self.0)
            }
        }
    };
}

id_type!(
    /// A row (internal state) of a flow table, in row order.
    StateId
);
id_type!(
    /// A listed input column of a flow table, in listed order.
    ColumnId
);
id_type!(
    /// An output variable, in the order of the `outputs` directive.
    OutputId
);
id_type!(
    /// An input variable, in the order of the `inputs` directive.
    InputId
);
