//! The validation error: which field of a design is wrong, and why. Its own module so that the
//! prepared tour (which reports unknown bodies and kernels) and the file checks share it without
//! depending on each other.

/// A validation problem, before a path is attached.
#[derive(Clone, Debug, PartialEq)]
pub struct Invalid {
    /// The field, e.g. `stops[2].epoch`.
    pub field: String,
    /// Why.
    pub reason: String,
}

impl std::fmt::Display for Invalid {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.field, self.reason)
    }
}
