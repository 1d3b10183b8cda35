//! Unit tests of the zeros area against hand-worked values and identities.

use super::batch::{invariant_zeros_batch, BatchShape};
use super::dc_gain::dc_gain;
use super::pencil::{invariant_zeros, normal_rank, transmission_zeros};
use super::zeros_poles_gain::{polynomial_from_roots, realize_zeros_poles_gain, zeros_poles_gain};
use crate::error::ModelError;
use crate::matrix::Matrix;
use crate::realize::Form;
use crate::state_space::StateSpace;

fn m(r: usize, c: usize, v: &[f64]) -> Matrix<f64> {
    Matrix::from_row_major(r, c, v.to_vec()).unwrap()
}

fn model(
    n: usize,
    mi: usize,
    p: usize,
    a: &[f64],
    b: &[f64],
    c: &[f64],
    d: &[f64],
) -> StateSpace<f64> {
    StateSpace::new(m(n, n, a), m(n, mi, b), m(p, n, c), m(p, mi, d)).unwrap()
}

fn assert_zeros(found: &[(f64, f64)], expected: &[(f64, f64)], tol: f64) {
    assert_eq!(found.len(), expected.len(), "{found:?} vs {expected:?}");
    for (f, e) in found.iter().zip(expected) {
        let size = 1.0 + e.0.hypot(e.1);
        assert!(
            (f.0 - e.0).hypot(f.1 - e.1) <= tol * size,
            "{found:?} vs {expected:?}"
        );
    }
}

#[test]
fn siso_companion_zero_is_the_numerator_root() {
    // (hand-worked) G = (s + 2) / ((s + 1)(s + 3)) in controllable canonical form.
    let ss = model(
        2,
        1,
        1,
        &[0.0, 1.0, -3.0, -4.0],
        &[0.0, 1.0],
        &[2.0, 1.0],
        &[0.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-2.0, 0.0)], 1e-13);
    assert_eq!(z.info.normal_rank, 1);
    assert!(z.info.residual < 1e-14, "{}", z.info.residual);
}

#[test]
fn feedthrough_zero_is_an_eigenvalue_of_a_minus_b_inv_d_c() {
    // (identity) D invertible: zeros = eig(A − B D⁻¹ C); here −1 − 1 = −2.
    let ss = model(1, 1, 1, &[-1.0], &[1.0], &[1.0], &[1.0]);
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-2.0, 0.0)], 1e-15);
}

#[test]
fn complex_zeros_come_in_exact_conjugate_pairs_sorted() {
    // (hand-worked) numerator s² + 2s + 5: zeros −1 ± 2j; denominator (s+1)(s+2)(s+3).
    let ss = model(
        3,
        1,
        1,
        &[0.0, 1.0, 0.0, 0.0, 0.0, 1.0, -6.0, -11.0, -6.0],
        &[0.0, 0.0, 1.0],
        &[5.0, 2.0, 1.0],
        &[0.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-1.0, -2.0), (-1.0, 2.0)], 1e-13);
    assert_eq!(z.zeros[0].0, z.zeros[1].0);
    assert_eq!(z.zeros[0].1, -z.zeros[1].1);
}

#[test]
fn uncontrollable_mode_is_an_invariant_but_not_a_transmission_zero() {
    // (hand-worked) det [[-1-s, 0, 1], [0, -5-s, 0], [1, 1, 0]] = s + 5.
    let ss = model(
        2,
        1,
        1,
        &[-1.0, 0.0, 0.0, -5.0],
        &[1.0, 0.0],
        &[1.0, 1.0],
        &[0.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-5.0, 0.0)], 1e-14);
    let t = transmission_zeros(&ss, None).unwrap();
    assert!(t.zeros.is_empty(), "{:?}", t.zeros);
}

#[test]
fn non_square_model_with_a_planted_common_zero() {
    // (known structure) G = [1; 2] (s + 3) / ((s + 1)(s + 2)): rank 1, a zero at −3 only.
    let ss = model(
        2,
        1,
        2,
        &[0.0, 1.0, -2.0, -3.0],
        &[0.0, 1.0],
        &[3.0, 1.0, 6.0, 2.0],
        &[0.0, 0.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-3.0, 0.0)], 1e-13);
    assert_eq!(z.info.normal_rank, 1);
    // Different zeros per row: no common zero, no invariant zero.
    let ss2 = model(
        2,
        1,
        2,
        &[0.0, 1.0, -2.0, -3.0],
        &[0.0, 1.0],
        &[3.0, 1.0, 5.0, 1.0],
        &[0.0, 0.0],
    );
    assert!(invariant_zeros(&ss2, None).unwrap().zeros.is_empty());
    // The wide (dual) model has the same zeros.
    let z3 = invariant_zeros(&ss.dual(), None).unwrap();
    assert_zeros(&z3.zeros, &[(-3.0, 0.0)], 1e-13);
}

#[test]
fn zeros_do_not_change_under_scaling_of_states_inputs_and_outputs() {
    // (identity) zeros of (T⁻¹AT, T⁻¹BR, LCT, LDR) equal those of (A, B, C, D).
    let ss = model(
        3,
        1,
        1,
        &[0.0, 1.0, 0.0, 0.0, 0.0, 1.0, -6.0, -11.0, -6.0],
        &[0.0, 0.0, 1.0],
        &[5.0, 2.0, 1.0],
        &[0.0],
    );
    let t = [1e-7, 3.0, 1e9];
    let (r, l) = (1e12, 3e-11);
    let mut s2 = ss.clone();
    for i in 0..3 {
        for j in 0..3 {
            s2.a.set(i, j, ss.a.get(i, j) * t[j] / t[i]);
        }
        s2.b.set(i, 0, ss.b.get(i, 0) / t[i] * r);
        s2.c.set(0, i, ss.c.get(0, i) * t[i] * l);
    }
    let z1 = invariant_zeros(&ss, None).unwrap();
    let z2 = invariant_zeros(&s2, None).unwrap();
    assert_zeros(&z2.zeros, &z1.zeros, 1e-12);
}

#[test]
fn data_beyond_the_safe_range_give_scaled_zeros() {
    // (identity) zeros of (kA, kB, C, D) are k times the zeros.
    let k = 2f64.powi(700);
    let ss = model(
        2,
        1,
        1,
        &[0.0, k, -3.0 * k, -4.0 * k],
        &[0.0, k],
        &[2.0, 1.0],
        &[0.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert_eq!(z.zeros.len(), 1);
    assert!((z.zeros[0].0 / k + 2.0).abs() < 1e-13, "{:?}", z.zeros);
}

#[test]
fn gain_only_model_has_no_zeros_and_the_rank_of_d() {
    let ss = model(0, 2, 2, &[], &[], &[], &[1.0, 2.0, 2.0, 4.0]);
    let z = invariant_zeros(&ss, None).unwrap();
    assert!(z.zeros.is_empty());
    assert_eq!(normal_rank(&ss, None).unwrap(), 1);
}

#[test]
fn zero_transfer_matrix_has_normal_rank_zero() {
    let ss = model(
        2,
        1,
        1,
        &[-1.0, 0.0, 0.0, -2.0],
        &[0.0, 0.0],
        &[1.0, 1.0],
        &[0.0],
    );
    assert_eq!(normal_rank(&ss, None).unwrap(), 0);
}

#[test]
fn mimo_square_zero_from_the_rosenbrock_determinant() {
    // (hand-worked) A = diag(−1, −2), B = I, C = [[1, 1], [0, 1]], D = 0:
    // G = C (sI − A)⁻¹ has det = 1 / ((s+1)(s+2)): no finite zeros.
    let ss = model(
        2,
        2,
        2,
        &[-1.0, 0.0, 0.0, -2.0],
        &[1.0, 0.0, 0.0, 1.0],
        &[1.0, 1.0, 0.0, 1.0],
        &[0.0, 0.0, 0.0, 0.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert!(z.zeros.is_empty(), "{:?}", z.zeros);
    assert_eq!(z.info.normal_rank, 2);
    // (identity) with D = I the zeros are eig(A − B D⁻¹ C) = eig([[−2, −1], [0, −3]]).
    let ss = model(
        2,
        2,
        2,
        &[-1.0, 0.0, 0.0, -2.0],
        &[1.0, 0.0, 0.0, 1.0],
        &[1.0, 1.0, 0.0, 1.0],
        &[1.0, 0.0, 0.0, 1.0],
    );
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-3.0, 0.0), (-2.0, 0.0)], 1e-14);
}

#[test]
fn bad_input_is_refused_with_the_argument_named() {
    let ss = model(1, 1, 1, &[f64::NAN], &[1.0], &[1.0], &[0.0]);
    assert_eq!(
        invariant_zeros(&ss, None).unwrap_err(),
        ModelError::NonFinite { arg: "a" }
    );
    let ok = model(1, 1, 1, &[-1.0], &[1.0], &[1.0], &[0.0]);
    assert!(matches!(
        invariant_zeros(&ok, Some(-1.0)),
        Err(ModelError::BadValue { arg: "tol", .. })
    ));
}

#[test]
fn dc_gain_of_a_stable_model_and_refusal_at_an_integrator() {
    // (hand-worked) G(0) = 2 / 3.
    let ss = model(
        2,
        1,
        1,
        &[0.0, 1.0, -3.0, -4.0],
        &[0.0, 1.0],
        &[2.0, 1.0],
        &[0.0],
    );
    let (g, info) = dc_gain(&ss, false).unwrap();
    assert!((g.get(0, 0) - 2.0 / 3.0).abs() < 1e-15);
    assert!(!info.reduced);
    let integ = model(1, 1, 1, &[0.0], &[1.0], &[1.0], &[0.0]);
    match dc_gain(&integ, false) {
        Err(ModelError::BadValue { arg: "a", detail }) => assert!(detail.contains("s = 0")),
        other => panic!("{other:?}"),
    }
    // (hand-worked) discrete: G(1) = 1 / (1 − 0.5) = 2; a pole at z = 1 is refused.
    let disc = model(1, 1, 1, &[0.5], &[1.0], &[1.0], &[0.0]);
    assert!((dc_gain(&disc, true).unwrap().0.get(0, 0) - 2.0).abs() < 1e-15);
    let at_one = model(1, 1, 1, &[1.0], &[1.0], &[1.0], &[0.0]);
    match dc_gain(&at_one, true) {
        Err(ModelError::BadValue { arg: "a", detail }) => assert!(detail.contains("z = 1")),
        other => panic!("{other:?}"),
    }
}

#[test]
fn dc_gain_with_an_uncontrollable_integrator_is_finite() {
    // (hand-worked) A = diag(0, −1), B = [0; 1], C = [1, 1]: G = 1 / (s + 1), G(0) = 1.
    let ss = model(
        2,
        1,
        1,
        &[0.0, 0.0, 0.0, -1.0],
        &[0.0, 1.0],
        &[1.0, 1.0],
        &[0.0],
    );
    let (g, info) = dc_gain(&ss, false).unwrap();
    assert!((g.get(0, 0) - 1.0).abs() < 1e-14, "{g:?}");
    assert!(info.reduced);
}

#[test]
fn zeros_poles_gain_of_a_factored_example() {
    // (hand-worked) (2s² + 6s + 4) / (s³ + 6s² + 11s + 6) = 2 (s+1)(s+2) / ((s+1)(s+2)(s+3)).
    let z = zeros_poles_gain(&[2.0, 6.0, 4.0], &[1.0, 6.0, 11.0, 6.0]).unwrap();
    assert_zeros(&z.zeros, &[(-2.0, 0.0), (-1.0, 0.0)], 1e-13);
    assert_zeros(&z.poles, &[(-3.0, 0.0), (-2.0, 0.0), (-1.0, 0.0)], 1e-13);
    assert_eq!(z.gain, 2.0);
    assert!(matches!(
        zeros_poles_gain(&[1.0, 0.0, 0.0], &[1.0, 1.0]),
        Err(ModelError::Improper { .. })
    ));
    assert!(matches!(
        zeros_poles_gain(&[1.0], &[0.0, 0.0]),
        Err(ModelError::ZeroPolynomial { arg: "den" })
    ));
    let zero = zeros_poles_gain(&[0.0], &[1.0, 1.0]).unwrap();
    assert!(zero.zeros.is_empty() && zero.gain == 0.0);
}

#[test]
fn polynomial_from_conjugate_pairs_is_real_and_exact() {
    // (hand-worked) (s − 1)(s² + 2s + 5).
    let p = polynomial_from_roots("zeros", &[-1.0, 1.0, -1.0], &[2.0, 0.0, -2.0]).unwrap();
    assert_eq!(p, vec![1.0, 1.0, 3.0, -5.0]);
    match polynomial_from_roots("poles", &[-1.0, -1.0], &[2.0, -3.0]) {
        Err(ModelError::BadValue {
            arg: "poles",
            detail,
        }) => {
            assert!(detail.contains("conjugate"), "{detail}")
        }
        other => panic!("{other:?}"),
    }
    match polynomial_from_roots("zeros", &[0.5], &[1.0]) {
        Err(ModelError::BadValue { arg: "zeros", .. }) => {}
        other => panic!("{other:?}"),
    }
}

#[test]
fn realize_zeros_poles_gain_round_trip() {
    // (identity) the zeros of the realization of k Π(s − z) / Π(s − p) are the given z.
    let ss = realize_zeros_poles_gain(
        (&[-1.0, -1.0], &[2.0, -2.0]),
        (&[-3.0, -2.0, -0.5], &[0.0, 0.0, 0.0]),
        4.0,
        Form::ControllableCanonical,
    )
    .unwrap();
    let z = invariant_zeros(&ss, None).unwrap();
    assert_zeros(&z.zeros, &[(-1.0, -2.0), (-1.0, 2.0)], 1e-13);
    let (g, _) = dc_gain(&ss, false).unwrap();
    // (hand-worked) G(0) = 4 · 5 / (3 · 2 · 0.5) = 20 / 3.
    assert!((g.get(0, 0) - 20.0 / 3.0).abs() < 1e-13);
}

#[test]
fn batch_equals_single_calls_and_names_the_bad_model() {
    let a = [0.0, 1.0, -3.0, -4.0, -1.0, 0.0, 0.0, -5.0];
    let b = [0.0, 1.0, 1.0, 0.0];
    let c = [2.0, 1.0, 1.0, 1.0];
    let d = [0.0, 0.0];
    let shape = BatchShape {
        count: 2,
        n: 2,
        m: 1,
        p: 1,
    };
    let out = invariant_zeros_batch(&a, &b, &c, &d, shape, None).unwrap();
    assert_eq!(out.counts, vec![1, 1]);
    assert_eq!(
        out.re[0],
        invariant_zeros(&model(2, 1, 1, &a[..4], &b[..2], &c[..2], &d[..1]), None)
            .unwrap()
            .zeros[0]
            .0
    );
    assert!((out.re[2] + 5.0).abs() < 1e-14);
    let mut bad = a;
    bad[5] = f64::INFINITY;
    match invariant_zeros_batch(&bad, &b, &c, &d, shape, None) {
        Err(ModelError::Batch { index: 1, .. }) => {}
        other => panic!("{:?}", other.err()),
    }
}
