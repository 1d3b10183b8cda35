//! Realizations of a SISO transfer function in the standard canonical forms.
//!
//! Every form starts from the proper split of [`crate::poly::split_proper`]:
//! `G(s) = d + c(s)/a(s)`, `a` monic of degree n. Each primal form has its dual (the
//! transposed realization, [`StateSpace::dual`]), which realizes the same SISO transfer
//! function.
//!
//! | form | module |
//! | --- | --- |
//! | controllable_canonical, observable_canonical | [`controllable`] |
//! | controller, observer | [`controller`] |
//! | controllability, observability | [`krylov`] |
//! | modal | [`modal`] (float only) |
//! | Luenberger controller / observer forms of MIMO models | [`multivariable`] |
//! | block_controller, block_observer (p × m transfer matrices) | [`transfer_matrix`] |

pub mod controllable;
pub mod controller;
pub mod jordan;
pub mod krylov;
pub mod modal;
pub mod multivariable;
pub mod roots;
pub mod transfer_matrix;

use crate::error::{ModelError, Result};
use crate::matrix::Matrix;
use crate::poly::{split_proper, strip_leading_zeros, ProperSplit};
use crate::scalar::Scalar;
use crate::state_space::StateSpace;
use std::str::FromStr;

/// The canonical forms on offer.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Form {
    ControllableCanonical,
    ObservableCanonical,
    Controller,
    Observer,
    Controllability,
    Observability,
    Modal,
    Jordan,
}

/// Largest order realized (an n×n A of float64 takes 8 n² bytes: 128 MiB here).
pub const MAX_ORDER: usize = 4096;
/// Largest order of the modal form (a dense eigen-decomposition, O(n³)).
pub const MAX_MODAL_ORDER: usize = 1024;

/// Refuses orders above `limit` before anything of that size is allocated.
pub(crate) fn check_order(n: usize, limit: usize, what: &str) -> Result<()> {
    if n > limit {
        return Err(ModelError::TooLarge {
            arg: "den",
            detail: format!("order {n} exceeds the limit {limit} for {what}"),
        });
    }
    Ok(())
}

pub const FORM_NAMES: &str = "'controllable_canonical', 'observable_canonical', 'controller', \
'observer', 'controllability', 'observability', 'modal', 'jordan'";

impl FromStr for Form {
    type Err = ModelError;
    fn from_str(s: &str) -> Result<Self> {
        Ok(match s {
            "controllable_canonical" => Form::ControllableCanonical,
            "observable_canonical" => Form::ObservableCanonical,
            "controller" => Form::Controller,
            "observer" => Form::Observer,
            "controllability" => Form::Controllability,
            "observability" => Form::Observability,
            "modal" => Form::Modal,
            "jordan" => Form::Jordan,
            other => {
                return Err(ModelError::BadOption {
                    arg: "form",
                    found: other.to_string(),
                    allowed: FORM_NAMES,
                })
            }
        })
    }
}

/// Realize `num/den` in one of the companion forms (every form but `Modal`), over any
/// [`Scalar`] — exact rationals give exact realizations.
///
/// # Errors
/// Those of [`split_proper`]; `BadOption` for `Form::Modal` (use [`modal::realize_modal`]).
pub fn realize_companion<T: Scalar>(num: &[T], den: &[T], form: Form) -> Result<StateSpace<T>> {
    check_order(
        strip_leading_zeros(den).len().saturating_sub(1),
        MAX_ORDER,
        "a realization",
    )?;
    let split = split_proper(num, den)?;
    companion_from_split(&split, form)
}

/// The companion form of an already split transfer function.
pub fn companion_from_split<T: Scalar>(
    split: &ProperSplit<T>,
    form: Form,
) -> Result<StateSpace<T>> {
    Ok(match form {
        Form::ControllableCanonical => controllable::controllable_canonical(split),
        Form::ObservableCanonical => controllable::controllable_canonical(split).dual(),
        Form::Controller => controller::controller(split),
        Form::Observer => controller::controller(split).dual(),
        Form::Controllability => krylov::controllability(split),
        Form::Observability => krylov::controllability(split).dual(),
        Form::Modal => {
            return Err(ModelError::BadOption {
                arg: "form",
                found: "modal".into(),
                allowed: "a companion form here; the modal form needs float data",
            })
        }
        Form::Jordan => {
            return Err(ModelError::BadOption {
                arg: "form",
                found: "jordan".into(),
                allowed: "a companion form here; the Jordan form has its own entry points",
            })
        }
    })
}

/// Realize in float64, any form including `Modal`; checks finiteness first.
pub fn realize_f64(
    num: &[f64],
    den: &[f64],
    form: Form,
) -> Result<(StateSpace<f64>, Option<modal::ModalInfo>)> {
    crate::error::require_finite("num", num)?;
    crate::error::require_finite("den", den)?;
    let order = strip_leading_zeros(den).len().saturating_sub(1);
    check_order(
        order,
        if form == Form::Modal {
            MAX_MODAL_ORDER
        } else {
            MAX_ORDER
        },
        "a realization in this form",
    )?;
    let split = split_proper(num, den)?;
    if split
        .den
        .iter()
        .chain(&split.strict_num)
        .any(|v| !v.is_finite())
        || !split.direct.is_finite()
    {
        return Err(ModelError::Overflow {
            what: "normalising num/den by the leading denominator coefficient".into(),
        });
    }
    let (ss, info) = if form == Form::Modal {
        let (ss, info) = modal::modal_from_split(&split)?;
        (ss, Some(info))
    } else if form == Form::Jordan {
        (jordan::jordan_from_split(&split, None)?.0, None)
    } else if matches!(form, Form::Controllability | Form::Observability) {
        // The Markov parameters exactly from the dyadic data, rounded once.
        let h = krylov::markov_parameters_f64(num, den)?;
        let mut ss = krylov::controllability(&split);
        if split.order() > 0 {
            ss.c = Matrix::from_row_major(1, h.len(), h).expect("1 x n");
        }
        (
            if form == Form::Observability {
                ss.dual()
            } else {
                ss
            },
            None,
        )
    } else {
        (companion_from_split(&split, form)?, None)
    };
    // The Markov parameters of the controllability forms can overflow from finite data.
    if [&ss.a, &ss.b, &ss.c, &ss.d]
        .iter()
        .any(|m| m.as_slice().iter().any(|v| !v.is_finite()))
    {
        return Err(ModelError::Overflow {
            what: format!("the {form:?} realization of num/den"),
        });
    }
    Ok((ss, info))
}

/// The float Jordan form of `num/den` with its cluster tolerance (None: the default).
///
/// # Errors
/// Those of [`realize_f64`] and [`jordan::jordan_from_split`].
pub fn realize_jordan_f64(
    num: &[f64],
    den: &[f64],
    tol: Option<f64>,
) -> Result<(StateSpace<f64>, jordan::JordanInfo)> {
    crate::error::require_finite("num", num)?;
    crate::error::require_finite("den", den)?;
    check_order(
        strip_leading_zeros(den).len().saturating_sub(1),
        MAX_MODAL_ORDER,
        "the Jordan form",
    )?;
    let split = split_proper(num, den)?;
    if split
        .den
        .iter()
        .chain(&split.strict_num)
        .any(|v| !v.is_finite())
        || !split.direct.is_finite()
    {
        return Err(ModelError::Overflow {
            what: "normalising num/den by the leading denominator coefficient".into(),
        });
    }
    jordan::jordan_from_split(&split, tol)
}

/// The exact Jordan form of `num/den` (denominator factored over the rationals).
///
/// # Errors
/// Those of [`split_proper`]; `TooLarge` above order 256.
pub fn realize_jordan_exact(
    num: &[num_rational::BigRational],
    den: &[num_rational::BigRational],
) -> Result<(
    StateSpace<num_rational::BigRational>,
    Vec<jordan::ExactFactor>,
)> {
    check_order(
        strip_leading_zeros(den).len().saturating_sub(1),
        256,
        "the exact Jordan form",
    )?;
    let split = split_proper(num, den)?;
    jordan::jordan_exact(&split)
}

/// `[[d]]` and the 0-state pieces shared by every form of a pure gain.
pub(crate) fn gain_only<T: Scalar>(d: &T) -> StateSpace<T> {
    StateSpace {
        a: Matrix::zeros(0, 0),
        b: Matrix::zeros(0, 1),
        c: Matrix::zeros(1, 0),
        d: Matrix::from_row_major(1, 1, vec![d.clone()]).expect("1x1"),
    }
}
