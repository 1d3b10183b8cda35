//! Conversions between continuous and discrete time by method name: `to_discrete` maps
//! `(A, B, C, D)` in s to a model in z advancing once per T seconds, `to_continuous` is
//! its inverse where the method has one.
//!
//! # Purpose
//! One entry point per direction for the six methods: `zero_order_hold`,
//! `first_order_hold`, `impulse_invariant`, `bilinear` (optionally prewarped),
//! `forward_difference`, `backward_difference`; exact rational arithmetic for the last
//! three, which are rational operations.
//!
//! # Method
//! Checks at entry (shapes, finite entries, a positive finite sample time, a prewarp
//! frequency only for the bilinear map), then the method's module: [`super::zero_order_hold`],
//! [`super::first_order_hold`], [`super::impulse_invariant`], [`super::bilinear`], on a
//! copy of the model balanced by powers of two (Parlett & Reinsch, [`crate::balance`]),
//! whose result is brought back to the given state coordinates exactly.
//!
//! # Numerical aspects
//! See each module. Every float result is finite or refused; every inverse conversion
//! through a logarithm is verified by converting back, with the residual in the info.
//!
//! # References
//! See each module.
//!
//! # Errors
//! `BadOption` on `method`; `BadValue` on `sample_time`, on `prewarp_frequency`, on `a`
//! (no real logarithm, singular map) and on `d` (impulse invariance); `Shape`, `NonFinite`.

use super::bilinear::{self, check_exact_sample_time, prewarped_step, Substitution};
use super::dense::{check_model, norm1, to_na};
pub use super::zero_order_hold::Converted as Conversion;
use super::{first_order_hold, impulse_invariant, zero_order_hold};
use crate::balance::balance_model;
use crate::error::{ModelError, Result};
use crate::state_space::StateSpace;
use num_rational::BigRational;
use std::str::FromStr;

/// How a continuous model is sampled (and a discrete one taken back).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DiscretizationMethod {
    ZeroOrderHold,
    FirstOrderHold,
    ImpulseInvariant,
    Bilinear,
    ForwardDifference,
    BackwardDifference,
}

const METHODS: &str = "'zero_order_hold', 'first_order_hold', 'impulse_invariant', 'bilinear', \
                       'forward_difference', 'backward_difference'";

impl FromStr for DiscretizationMethod {
    type Err = ModelError;
    fn from_str(s: &str) -> Result<Self> {
        Ok(match s {
            "zero_order_hold" => DiscretizationMethod::ZeroOrderHold,
            "first_order_hold" => DiscretizationMethod::FirstOrderHold,
            "impulse_invariant" => DiscretizationMethod::ImpulseInvariant,
            "bilinear" => DiscretizationMethod::Bilinear,
            "forward_difference" => DiscretizationMethod::ForwardDifference,
            "backward_difference" => DiscretizationMethod::BackwardDifference,
            _ => {
                return Err(ModelError::BadOption {
                    arg: "method",
                    found: s.into(),
                    allowed: METHODS,
                })
            }
        })
    }
}

impl DiscretizationMethod {
    /// The rational substitution behind the method, if it is one.
    pub fn substitution(self) -> Option<Substitution> {
        match self {
            DiscretizationMethod::Bilinear => Some(Substitution::Bilinear),
            DiscretizationMethod::ForwardDifference => Some(Substitution::ForwardDifference),
            DiscretizationMethod::BackwardDifference => Some(Substitution::BackwardDifference),
            _ => None,
        }
    }
}

fn step(sample_time: f64, method: DiscretizationMethod, prewarp: Option<f64>) -> Result<f64> {
    super::dense::check_sample_time(sample_time)?;
    match prewarp {
        None => Ok(sample_time),
        Some(w) if method == DiscretizationMethod::Bilinear => prewarped_step(sample_time, w),
        Some(_) => Err(ModelError::BadValue {
            arg: "prewarp_frequency",
            detail: "only the bilinear method is prewarped; leave prewarp_frequency at None for the others".into(),
        }),
    }
}

fn substitute(
    ss: &StateSpace<f64>,
    t: f64,
    map: Substitution,
    forward: bool,
) -> Result<Conversion> {
    let (model, inverted, inverse) = if forward {
        bilinear::to_discrete(ss, &t, map)?
    } else {
        bilinear::to_continuous(ss, &t, map)?
    };
    // The inverse was formed by Gauss–Jordan; judge it by its condition number.
    let n = inverted.rows();
    let condition = norm1(&to_na(&inverted)) * norm1(&to_na(&inverse));
    if n > 0 && !(condition.is_finite() && condition * (n as f64) * f64::EPSILON <= 1.0) {
        return Err(ModelError::BadValue {
            arg: "a",
            detail: format!("{} (to working precision)", map.singular_detail(forward)),
        });
    }
    for (arg, m) in [
        ("a", &model.a),
        ("b", &model.b),
        ("c", &model.c),
        ("d", &model.d),
    ] {
        if !m.as_slice().iter().all(|v| v.is_finite()) {
            return Err(ModelError::Overflow {
                what: format!("the converted model's {arg}"),
            });
        }
    }
    Ok(Conversion {
        realization: model,
        info: vec![("condition", condition), ("effective_step", t)],
    })
}

/// `convert` applied to a copy of the model balanced by powers of two,
/// `(S⁻¹ A S, S⁻¹ B, C S, D)`, and its result brought back to the caller's state
/// coordinates, `(S A' S⁻¹, S B', C' S⁻¹, D')`.
///
/// Every method is a function of A applied alike in any state coordinates, so the result
/// is the conversion of the given model; the scalings are exact (only exponents change).
/// Why: states in very different units make ‖A‖ many orders larger than the spectral
/// radius, and the scaling and squaring of the exponential (or the square roots of the
/// logarithm) then amplify rounding errors until nothing is left (`exp(A T)` of a model
/// with states scaled over 2^±20 came out 100 % wrong); balanced, the same model is
/// converted to full accuracy. The refusals and the verification residuals are judged on
/// the balanced model, where they mean what they say.
fn in_balanced_coordinates(
    ss: &StateSpace<f64>,
    convert: impl FnOnce(&StateSpace<f64>) -> Result<Conversion>,
) -> Result<Conversion> {
    let (balanced, scale) = balance_model(ss);
    if scale.iter().all(|&s| s == 1.0) {
        return convert(ss);
    }
    let mut out = convert(&balanced)?;
    let model = &mut out.realization;
    crate::balance::unbalance_in_place(
        model.a.as_mut_slice(),
        model.b.as_mut_slice(),
        model.c.as_mut_slice(),
        &scale,
    )?;
    Ok(out)
}

/// The discrete model of `ss` with sample time `sample_time` by `method`.
pub fn to_discrete(
    ss: &StateSpace<f64>,
    sample_time: f64,
    method: DiscretizationMethod,
    prewarp_frequency: Option<f64>,
) -> Result<Conversion> {
    check_model(ss)?;
    let t = step(sample_time, method, prewarp_frequency)?;
    if method == DiscretizationMethod::ZeroOrderHold
        && zero_order_hold::fits_small(ss.n_states(), ss.n_inputs())
    {
        // Balances and scales back itself, on the stack (C and D unchanged).
        return zero_order_hold::to_discrete_small(ss, t);
    }
    in_balanced_coordinates(ss, |ss| match method {
        DiscretizationMethod::ZeroOrderHold => zero_order_hold::to_discrete(ss, t),
        DiscretizationMethod::FirstOrderHold => first_order_hold::to_discrete(ss, t),
        DiscretizationMethod::ImpulseInvariant => impulse_invariant::to_discrete(ss, t),
        _ => substitute(ss, t, method.substitution().expect("rational method"), true),
    })
}

/// The continuous model whose discretization by `method` with `sample_time` is `ss`.
pub fn to_continuous(
    ss: &StateSpace<f64>,
    sample_time: f64,
    method: DiscretizationMethod,
    prewarp_frequency: Option<f64>,
) -> Result<Conversion> {
    check_model(ss)?;
    let t = step(sample_time, method, prewarp_frequency)?;
    in_balanced_coordinates(ss, |ss| match method {
        DiscretizationMethod::ZeroOrderHold => zero_order_hold::to_continuous(ss, t),
        DiscretizationMethod::FirstOrderHold => first_order_hold::to_continuous(ss, t),
        DiscretizationMethod::ImpulseInvariant => impulse_invariant::to_continuous(ss, t),
        _ => substitute(
            ss,
            t,
            method.substitution().expect("rational method"),
            false,
        ),
    })
}

fn exact_substitution(method: DiscretizationMethod) -> Result<Substitution> {
    method.substitution().ok_or(ModelError::BadOption {
        arg: "method",
        found: format!("{method:?} with exact=True"),
        allowed: "'bilinear', 'forward_difference', 'backward_difference' when exact=True (the holds and impulse \
                  invariance need the exponential, which is not rational)",
    })
}

/// [`to_discrete`] in exact rational arithmetic (rational methods only, no prewarping).
pub fn to_discrete_exact(
    ss: &StateSpace<BigRational>,
    sample_time: &BigRational,
    method: DiscretizationMethod,
) -> Result<StateSpace<BigRational>> {
    let map = exact_substitution(method)?;
    let ss = StateSpace::new(ss.a.clone(), ss.b.clone(), ss.c.clone(), ss.d.clone())?;
    check_exact_sample_time(sample_time)?;
    Ok(bilinear::to_discrete(&ss, sample_time, map)?.0)
}

/// [`to_continuous`] in exact rational arithmetic (rational methods only, no prewarping).
pub fn to_continuous_exact(
    ss: &StateSpace<BigRational>,
    sample_time: &BigRational,
    method: DiscretizationMethod,
) -> Result<StateSpace<BigRational>> {
    let map = exact_substitution(method)?;
    let ss = StateSpace::new(ss.a.clone(), ss.b.clone(), ss.c.clone(), ss.d.clone())?;
    check_exact_sample_time(sample_time)?;
    Ok(bilinear::to_continuous(&ss, sample_time, map)?.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::matrix::Matrix;
    use num_bigint::BigInt;

    fn model() -> StateSpace<f64> {
        StateSpace::new(
            Matrix::from_row_major(3, 3, vec![0.0, 1.0, 0.0, -2.0, -0.3, 1.0, 0.5, 0.0, -4.0])
                .unwrap(),
            Matrix::from_row_major(3, 2, vec![0.0, 1.0, 1.0, 0.0, 2.0, -1.0]).unwrap(),
            Matrix::from_row_major(1, 3, vec![1.0, 0.0, 0.5]).unwrap(),
            Matrix::from_row_major(1, 2, vec![0.0, 0.0]).unwrap(),
        )
        .unwrap()
    }

    #[test]
    fn every_method_round_trips() {
        // to_continuous(to_discrete(G)) = G (identity).
        use DiscretizationMethod::*;
        let ss = model();
        for method in [
            ZeroOrderHold,
            FirstOrderHold,
            ImpulseInvariant,
            Bilinear,
            ForwardDifference,
            BackwardDifference,
        ] {
            let d = to_discrete(&ss, 0.2, method, None).unwrap().realization;
            let back = to_continuous(&d, 0.2, method, None).unwrap().realization;
            for (x, y) in [
                (&back.a, &ss.a),
                (&back.b, &ss.b),
                (&back.c, &ss.c),
                (&back.d, &ss.d),
            ] {
                for (u, v) in x.as_slice().iter().zip(y.as_slice()) {
                    assert!((u - v).abs() < 1e-11, "{method:?}: {u} vs {v}");
                }
            }
        }
    }

    #[test]
    fn first_order_lag_zero_order_hold_closed_form() {
        // a = −1: A_d = e^{−T}, B_d = 1 − e^{−T} (from memory: the sampled first-order lag).
        let ss = StateSpace::new(
            Matrix::from_row_major(1, 1, vec![-1.0]).unwrap(),
            Matrix::from_row_major(1, 1, vec![1.0]).unwrap(),
            Matrix::from_row_major(1, 1, vec![1.0]).unwrap(),
            Matrix::from_row_major(1, 1, vec![0.0]).unwrap(),
        )
        .unwrap();
        let d = to_discrete(&ss, 0.5, DiscretizationMethod::ZeroOrderHold, None).unwrap();
        let e = (-0.5f64).exp();
        assert!((d.realization.a.as_slice()[0] - e).abs() < 1e-16);
        assert!((d.realization.b.as_slice()[0] - (1.0 - e)).abs() < 1e-16);
    }

    #[test]
    fn exact_bilinear_round_trip() {
        let q = |p: i64, r: i64| BigRational::new(BigInt::from(p), BigInt::from(r));
        let ss = StateSpace::new(
            Matrix::from_row_major(2, 2, vec![q(-1, 3), q(2, 1), q(0, 1), q(-5, 7)]).unwrap(),
            Matrix::from_row_major(2, 1, vec![q(1, 1), q(3, 2)]).unwrap(),
            Matrix::from_row_major(1, 2, vec![q(2, 5), q(-1, 1)]).unwrap(),
            Matrix::from_row_major(1, 1, vec![q(1, 9)]).unwrap(),
        )
        .unwrap();
        let t = q(1, 10);
        for method in [
            DiscretizationMethod::Bilinear,
            DiscretizationMethod::ForwardDifference,
            DiscretizationMethod::BackwardDifference,
        ] {
            let d = to_discrete_exact(&ss, &t, method).unwrap();
            assert_eq!(to_continuous_exact(&d, &t, method).unwrap(), ss);
        }
        // A_d of the bilinear map on a = −1/3 alone: (1 − 1/60)/(1 + 1/60) = 59/61 (by hand).
        let d = to_discrete_exact(&ss, &t, DiscretizationMethod::Bilinear).unwrap();
        assert_eq!(d.a.get(0, 0), &q(59, 61));
        assert!(to_discrete_exact(&ss, &t, DiscretizationMethod::ZeroOrderHold).is_err());
    }

    #[test]
    fn refusals_name_their_argument() {
        let ss = model();
        let e = to_discrete(&ss, -1.0, DiscretizationMethod::ZeroOrderHold, None).unwrap_err();
        assert!(e.to_string().starts_with("sample_time"), "{e}");
        let e = to_discrete(&ss, 0.1, DiscretizationMethod::ZeroOrderHold, Some(1.0)).unwrap_err();
        assert!(e.to_string().starts_with("prewarp_frequency"), "{e}");
        let e = "tustin".parse::<DiscretizationMethod>().unwrap_err();
        assert!(e.to_string().starts_with("method"), "{e}");
    }
}
