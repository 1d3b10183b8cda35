//! Controllable canonical (phase-variable) form.
//!
//! States are the phase variables x_1 = z, x_2 = z', ..., x_n = z^(n-1) of
//! `a(p) z = u`, so A has ones on the superdiagonal and last row `[-a_0, ..., -a_{n-1}]`,
//! `B = e_n`, `C = [c_0, ..., c_{n-1}]`, `D = d`. Identity: `C (sI - A)^-1 B = c(s)/a(s)`,
//! since `(sI - A)^-1 e_n = [1, s, ..., s^(n-1)]ᵀ / a(s)`.
//! The observable canonical form is its dual.

use crate::matrix::Matrix;
use crate::poly::ProperSplit;
use crate::scalar::Scalar;
use crate::state_space::StateSpace;

pub fn controllable_canonical<T: Scalar>(split: &ProperSplit<T>) -> StateSpace<T> {
    let n = split.order();
    if n == 0 {
        return super::gain_only(&split.direct);
    }
    let mut a = Matrix::zeros(n, n);
    for i in 0..n - 1 {
        a.set(i, i + 1, T::one());
    }
    for j in 0..n {
        a.set(n - 1, j, split.a(j).neg());
    }
    let mut b = Matrix::zeros(n, 1);
    b.set(n - 1, 0, T::one());
    let mut c = Matrix::zeros(1, n);
    for j in 0..n {
        c.set(0, j, split.c(j).clone());
    }
    let d = Matrix::from_row_major(1, 1, vec![split.direct.clone()]).expect("1x1");
    StateSpace { a, b, c, d }
}

/// [`crate::realize::realize_f64`]`(num, den, Form::ControllableCanonical)` written into
/// preallocated row-major slices (`a` n×n, `b` n×1, `c` 1×n, all zero on entry; n =
/// `den.len() − 1`): the same float operations in the same order, hence the same bits and
/// the same errors, without the intermediate vectors (the batch's route; `den[0] ≠ 0`,
/// `1 ≤ num.len() ≤ den.len()` and n ≤ [`crate::realize::MAX_ORDER`] are the caller's checks).
///
/// # Errors
/// `NonFinite` for num or den, `Overflow` when the division by the leading coefficient
/// overflows (as [`crate::realize::realize_f64`]).
pub fn controllable_canonical_into(
    num: &[f64],
    den: &[f64],
    a: &mut [f64],
    b: &mut [f64],
    c: &mut [f64],
) -> crate::error::Result<f64> {
    use crate::error::{require_finite, ModelError};
    require_finite("num", num)?;
    require_finite("den", den)?;
    let n = den.len() - 1;
    let lead = den[0];
    let num = &num[num.iter().position(|x| *x != 0.0).unwrap_or(num.len())..];
    let pad = n + 1 - num.len();
    // The padded numerator over the leading coefficient, as poly::split_proper forms it.
    let scaled = |i: usize| if i < pad { 0.0 } else { num[i - pad] / lead };
    let direct = scaled(0);
    let mut finite = direct.is_finite() && den.iter().all(|x| (x / lead).is_finite());
    for i in 1..=n {
        let monic = den[i] / lead;
        let strict = scaled(i) - monic * direct;
        finite &= strict.is_finite();
        // c_k = strict_num[n − 1 − k] and A's last row −a_k = −monic[n − k].
        c[n - i] = strict;
        a[(n - 1) * n + (n - i)] = -monic;
    }
    if !finite {
        return Err(ModelError::Overflow {
            what: "normalising num/den by the leading denominator coefficient".into(),
        });
    }
    if n > 0 {
        for i in 0..n - 1 {
            a[i * n + i + 1] = 1.0;
        }
        b[n - 1] = 1.0;
    }
    Ok(direct)
}
