//! Canonical forms of a transfer function whose coefficients are functions of parameters.
//!
//! # Purpose
//! `G(s) = num(s) / den(s)` with coefficients in `Q(parameters)` realized in the companion
//! forms of [`crate::realize`]: A, B, C, D with entries in `Q(parameters)` such that
//! `C (sI − A)⁻¹ B + D = G(s)` identically in the parameters.
//!
//! # Method
//! The generic realizations over any [`crate::scalar::Scalar`] run over
//! [`RationalFunction`]: the proper split divides by the leading denominator coefficient
//! (a field operation, reduced to lowest terms), the companion forms place coefficients, and
//! the controllability forms add the Markov parameters `h_k` by their recurrence.
//!
//! # Numerical aspects
//! Exact and generic: valid wherever the leading denominator coefficient and the entry
//! denominators do not vanish. A leading coefficient that is a nonzero function (e.g. `J`)
//! counts as nonzero; leading coefficients that are identically zero are dropped, as for
//! numbers. The Markov parameters grow in degree with k: the controllability forms are
//! refused before the work when their estimated size exceeds the budget.
//!
//! # References
//! T. Kailath, *Linear Systems*, Prentice-Hall 1980, §2.1 (the companion forms, from memory).
//!
//! # Errors
//! Those of [`crate::poly::split_proper`] (`ZeroPolynomial`, `Improper`); `BadOption` for
//! a form without a companion structure (`modal`); `TooLarge` beyond
//! [`MAX_PARAMETRIC_REALIZATION_ORDER`] or the size budget.

use super::rational_function::RationalFunction;
use crate::error::{ModelError, Result};
use crate::poly::strip_leading_zeros;
use crate::realize::{realize_companion, Form};
use crate::state_space::StateSpace;

/// Largest order realized with parametric coefficients.
pub const MAX_PARAMETRIC_REALIZATION_ORDER: usize = 256;

/// Largest estimated number of terms of the Markov parameters (controllability forms).
const MAX_MARKOV_TERMS: f64 = 2e6;

/// A realization of `num / den` (highest power first) in a companion form.
pub fn realize_parametric(
    num: &[RationalFunction],
    den: &[RationalFunction],
    form: Form,
) -> Result<StateSpace<RationalFunction>> {
    let order = strip_leading_zeros(den).len().saturating_sub(1);
    if order > MAX_PARAMETRIC_REALIZATION_ORDER {
        return Err(ModelError::TooLarge {
            arg: "expr",
            detail: format!(
                "order {order} exceeds the limit {MAX_PARAMETRIC_REALIZATION_ORDER} for parametric realizations"
            ),
        });
    }
    if form == Form::Modal {
        return Err(ModelError::BadOption {
            arg: "form",
            found: "modal".into(),
            allowed: "a companion form for parametric coefficients (the poles are not rational \
                      functions of the parameters in general)",
        });
    }
    if matches!(form, Form::Controllability | Form::Observability) {
        // h_k has about k times the terms of a coefficient, times the terms of 1 / a_n^k.
        let terms = num
            .iter()
            .chain(den)
            .map(|q| (q.numerator().term_count() + q.denominator().term_count()) as f64)
            .fold(1.0, f64::max);
        let estimate = (order as f64) * terms.powf(order.min(60) as f64 / 2.0).min(1e30);
        if estimate > MAX_MARKOV_TERMS {
            return Err(ModelError::TooLarge {
                arg: "expr",
                detail: format!(
                    "the Markov parameters of the {form:?} form at order {order} may hold about \
                     {estimate:.1e} terms (limit {MAX_MARKOV_TERMS:.0e}); a companion form \
                     (controllable_canonical, controller and their duals) places the coefficients as they are"
                ),
            });
        }
    }
    realize_companion(num, den, form).map_err(|e| match e {
        ModelError::ZeroPolynomial { .. } | ModelError::Improper { .. } => ModelError::BadValue {
            arg: "expr",
            detail: e.to_string(),
        },
        other => other,
    })
}

#[cfg(test)]
mod tests {
    use super::super::polynomial::Polynomial;
    use super::*;
    use crate::parametric::transfer::parametric_transfer_function;
    use crate::scalar::Scalar;
    use num_bigint::BigInt;

    fn x(i: usize) -> Polynomial {
        Polynomial::variable(i)
    }
    fn rf(n: Polynomial, d: Polynomial) -> RationalFunction {
        RationalFunction::new(n, d).unwrap()
    }
    fn poly(n: Polynomial) -> RationalFunction {
        RationalFunction::from_polynomial(n)
    }

    #[test]
    fn every_companion_form_realizes_the_expression() {
        // (identity) the transfer function of each form, by the parametric recursion, is
        // num/den over the monic denominator: G = (k s + 1) / (J s² + b s + k) + 1/2.
        let (j, b, k) = (x(0), x(1), x(2));
        let one = Polynomial::constant(BigInt::from(1));
        let half = rf(one.clone(), Polynomial::constant(BigInt::from(2)));
        // num = (k s + 1) + (J s² + b s + k)/2
        let den = vec![poly(j.clone()), poly(b.clone()), poly(k.clone())];
        let num: Vec<RationalFunction> = vec![
            half.mul(&poly(j.clone())),
            poly(k.clone()).add(&half.mul(&poly(b.clone()))),
            poly(one.clone()).add(&half.mul(&poly(k.clone()))),
        ];
        let monic: Vec<RationalFunction> = den.iter().map(|c| c.div_exact(&den[0])).collect();
        let expected_num: Vec<RationalFunction> =
            num.iter().map(|c| c.div_exact(&den[0])).collect();
        for form in [
            Form::ControllableCanonical,
            Form::ObservableCanonical,
            Form::Controller,
            Form::Observer,
            Form::Controllability,
            Form::Observability,
        ] {
            let ss = realize_parametric(&num, &den, form).unwrap();
            let (n_out, d_out) = parametric_transfer_function(&ss).unwrap();
            assert_eq!(d_out, monic, "{form:?}");
            assert_eq!(n_out, expected_num, "{form:?}");
        }
        assert!(matches!(
            realize_parametric(&num, &den, Form::Modal),
            Err(ModelError::BadOption { arg: "form", .. })
        ));
        let improper = [poly(one.clone()), poly(j.clone()), poly(one)];
        assert!(matches!(
            realize_parametric(&improper, &den[1..], Form::Controller),
            Err(ModelError::BadValue { arg: "expr", .. })
        ));
    }
}
