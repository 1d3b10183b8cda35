//! The one error type of the core. Every documented failure has its own variant, and every
//! message names the argument at fault, so the binding layer can pass it on unchanged.

use std::fmt;

/// Why a computation was refused. Each variant is a documented failure of a public routine;
/// none of them stands for a bug (bugs are panics, and the binding layer reports those apart).
#[derive(Debug, Clone, PartialEq)]
pub enum ModelError {
    /// An argument has the wrong shape or size.
    Shape {
        arg: &'static str,
        expected: String,
        found: String,
    },
    /// An argument holds NaN or an infinity.
    NonFinite { arg: &'static str },
    /// A polynomial is empty, or zero where a nonzero one is needed.
    ZeroPolynomial { arg: &'static str },
    /// The numerator degree exceeds the denominator degree.
    Improper {
        num_degree: usize,
        den_degree: usize,
    },
    /// An option has a value outside its documented set.
    BadOption {
        arg: &'static str,
        found: String,
        allowed: &'static str,
    },
    /// A value cannot be used as given (e.g. a malformed exact number).
    BadValue { arg: &'static str, detail: String },
    /// The modal form does not exist (repeated, defective poles) or is too ill-conditioned to trust.
    NoModalForm { detail: String },
    /// An iterative routine failed to converge.
    NoConvergence { routine: &'static str },
    /// A finite input produced a result outside the float64 range.
    Overflow { what: String },
    /// The request would need more memory or time than is reasonable; refused before allocation.
    TooLarge { arg: &'static str, detail: String },
    /// A result failed the check against its input that the routine makes before
    /// returning it (e.g. a balanced realization that is not balanced).
    Unverified { what: &'static str, detail: String },
    /// A model of a batch failed; `index` says which.
    Batch {
        index: usize,
        source: Box<ModelError>,
    },
}

pub type Result<T> = std::result::Result<T, ModelError>;

impl fmt::Display for ModelError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ModelError::Shape { arg, expected, found } => {
                write!(f, "{arg}: expected {expected}, found {found}")
            }
            ModelError::NonFinite { arg } => {
                write!(f, "{arg}: contains NaN or infinity; all entries must be finite")
            }
            ModelError::ZeroPolynomial { arg } => write!(
                f,
                "{arg}: the polynomial is empty or identically zero; it needs at least one nonzero coefficient"
            ),
            ModelError::Improper { num_degree, den_degree } => write!(
                f,
                "num: the transfer function is improper (numerator degree {num_degree} exceeds \
                 denominator degree {den_degree}); a state-space realization needs deg num <= deg den"
            ),
            ModelError::BadOption { arg, found, allowed } => {
                write!(f, "{arg}: unknown value {found:?}; expected one of {allowed}")
            }
            ModelError::BadValue { arg, detail } => write!(f, "{arg}: {detail}"),
            ModelError::NoModalForm { detail } => write!(f, "form='modal': {detail}"),
            ModelError::NoConvergence { routine } => {
                write!(f, "{routine} did not converge for this input")
            }
            ModelError::Overflow { what } => write!(
                f,
                "{what}: the result overflows the float64 range although the input is finite"
            ),
            ModelError::TooLarge { arg, detail } => write!(f, "{arg}: request too large: {detail}"),
            ModelError::Unverified { what, detail } => write!(
                f,
                "{what}: the result failed its verification and is refused: {detail}"
            ),
            ModelError::Batch { index, source } => write!(f, "model {index} of the batch: {source}"),
        }
    }
}

impl std::error::Error for ModelError {}

/// Refuse NaN and infinities in `values`, naming `arg`.
pub fn require_finite(arg: &'static str, values: &[f64]) -> Result<()> {
    if values.iter().all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(ModelError::NonFinite { arg })
    }
}
