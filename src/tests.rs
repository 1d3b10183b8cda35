//! Unit tests of the core (plain `cargo test`, no Python). Each check names its reference:
//! "(identity)" for a mathematical identity, "(hand)" for a value worked by hand here.

use crate::error::ModelError;
use crate::krylov::controllability_matrix;
use crate::matrix::Matrix;
use crate::poly::split_proper;
use crate::realize::{realize_companion, realize_f64, Form};
use crate::recover::dyadic::{round_ratio, round_scaled};
use crate::recover::faddeev_leverrier::{faddeev_leverrier, transfer_function};
use crate::recover::{faddeev_leverrier_f64, transfer_function_f64, Method};
use crate::state_space::StateSpace;
use num_bigint::BigInt;
use num_rational::BigRational;

fn q(p: i64, d: i64) -> BigRational {
    BigRational::new(BigInt::from(p), BigInt::from(d))
}

fn qs(v: &[i64]) -> Vec<BigRational> {
    v.iter().map(|&x| q(x, 1)).collect()
}

/// The tests' one pseudo-random generator (Knuth's MMIX linear congruential constants, top
/// 53 bits): deterministic, so every randomized test is repeatable.
pub(crate) struct Lcg(pub u64);

impl Lcg {
    pub(crate) fn next(&mut self) -> u64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        self.0 >> 11
    }

    pub(crate) fn below(&mut self, n: usize) -> usize {
        (self.next() % n as u64) as usize
    }
}

const COMPANION_FORMS: [Form; 6] = [
    Form::ControllableCanonical,
    Form::ObservableCanonical,
    Form::Controller,
    Form::Observer,
    Form::Controllability,
    Form::Observability,
];

#[test]
fn proper_split_of_a_non_monic_biproper_function() {
    // (2s³+3s²+s+5)/(2s³+12s²+22s+12): den/2 = s³+6s²+11s+6, d = 1,
    // c = b − a·d = [1.5−6, 0.5−11, 2.5−6] (hand)
    let s = split_proper(&qs(&[2, 3, 1, 5]), &qs(&[2, 12, 22, 12])).unwrap();
    assert_eq!(s.den, qs(&[1, 6, 11, 6]));
    assert_eq!(s.direct, q(1, 1));
    assert_eq!(s.strict_num, vec![q(-9, 2), q(-21, 2), q(-7, 2)]);
}

#[test]
fn leading_zeros_pure_gain_and_bad_polynomials() {
    let s = split_proper(&qs(&[0, 0, 4]), &qs(&[0, 2])).unwrap();
    assert_eq!((s.order(), s.direct.clone()), (0, q(2, 1)));
    assert_eq!(
        split_proper(&qs(&[1, 0]), &qs(&[0, 0])),
        Err(ModelError::ZeroPolynomial { arg: "den" })
    );
    assert_eq!(
        split_proper::<BigRational>(&[], &qs(&[1])),
        Err(ModelError::ZeroPolynomial { arg: "num" })
    );
    assert_eq!(
        split_proper(&qs(&[1, 0, 0]), &qs(&[1, 1])),
        Err(ModelError::Improper {
            num_degree: 2,
            den_degree: 1
        })
    );
    // A zero numerator is the zero transfer function, not an error.
    let z = split_proper(&qs(&[0]), &qs(&[1, 3, 2])).unwrap();
    assert!(z.strict_num.iter().all(|c| *c == q(0, 1)));
}

#[test]
fn every_companion_form_recovers_its_transfer_function_exactly() {
    // (identity) C adj(sI−A) B + det(sI−A) D = den_monic·d + c(s): the monic input back.
    let (num, den) = (qs(&[2, 3, 1, 5]), qs(&[2, 12, 22, 12]));
    let s = split_proper(&num, &den).unwrap();
    for form in COMPANION_FORMS {
        let ss = realize_companion(&num, &den, form).unwrap();
        let (n_out, d_out) = transfer_function(&ss);
        assert_eq!(d_out, s.den, "{form:?}");
        let expected: Vec<BigRational> = num.iter().map(|c| c / q(2, 1)).collect();
        assert_eq!(n_out, expected, "{form:?}");
    }
}

#[test]
fn controllability_form_has_identity_controllability_matrix() {
    // (identity) A^(k−1) e_1 = e_k in the controllability form.
    let ss = realize_companion(&qs(&[1, 2, 3]), &qs(&[1, 4, 5, 6]), Form::Controllability).unwrap();
    assert_eq!(controllability_matrix(&ss.a, &ss.b), Matrix::identity(3));
    // (identity) its C holds the Markov parameters h_k = C A^(k−1) B of the controllable form.
    let cc = realize_companion(
        &qs(&[1, 2, 3]),
        &qs(&[1, 4, 5, 6]),
        Form::ControllableCanonical,
    )
    .unwrap();
    let k = controllability_matrix(&cc.a, &cc.b);
    assert_eq!(cc.c.matmul(&k), ss.c);
}

#[test]
fn faddeev_leverrier_of_a_small_integer_matrix() {
    // [[1,2],[3,4]]: det(sI−A) = s² − 5s − 2, adj(sI−A) = I s + (A − 5I) (hand)
    let a = Matrix::from_row_major(2, 2, qs(&[1, 2, 3, 4])).unwrap();
    let (c, adj) = faddeev_leverrier(&a);
    assert_eq!(c, qs(&[1, -5, -2]));
    assert_eq!(
        adj[1],
        Matrix::from_row_major(2, 2, qs(&[-4, 2, 3, -1])).unwrap()
    );
}

#[test]
fn correct_rounding_of_scaled_integers() {
    // Ties go to even; values above a tie round up (IEEE 754 round to nearest).
    let two53 = BigInt::from(1u64 << 53);
    assert_eq!(round_scaled(&(&two53 + 1), 0), Some(9007199254740992.0));
    assert_eq!(round_scaled(&(&two53 + 3), 0), Some(9007199254740996.0));
    assert_eq!(
        round_scaled(&(BigInt::from(3) << 2000usize), -2000),
        Some(3.0)
    );
    assert_eq!(round_scaled(&BigInt::from(-5), -1), Some(-2.5));
    assert_eq!(round_scaled(&BigInt::from(1), 5000), None);
}

#[test]
fn correct_rounding_in_the_subnormal_range() {
    let tiny = f64::from_bits(1); // 2^-1074
                                  // (2^20 + 1/2) 2^-1074 + 2^-1126: above the tie, one rounding gives 2^20 + 1 quanta
                                  // (rounding to 53 bits first would land on the tie and go to the even 2^20).
    let v = (((BigInt::from(1u64 << 21) + 1) << 51usize) + 1, -1126i64);
    assert_eq!(round_scaled(&v.0, v.1), Some((1048577.0) * tiny));
    // Exact ties on the subnormal grid go to even; half the smallest subnormal goes to 0.
    assert_eq!(round_scaled(&BigInt::from(5), -1075), Some(2.0 * tiny));
    assert_eq!(round_scaled(&BigInt::from(7), -1075), Some(4.0 * tiny));
    assert_eq!(round_scaled(&BigInt::from(1), -1075), Some(0.0));
    assert_eq!(round_scaled(&BigInt::from(3), -1076), Some(tiny));
    assert_eq!(round_scaled(&BigInt::from(-3), -1076), Some(-tiny));
    assert_eq!(round_scaled(&BigInt::from(1), -3000), Some(0.0));
    // The largest subnormal rounding up into the normal range.
    let below = (BigInt::from(1u64 << 53) - 1, -1075i64); // (2^53 - 1) 2^-1075
    assert_eq!(round_scaled(&below.0, below.1), Some(f64::MIN_POSITIVE));
    // round_ratio: 1/3 correctly rounded, and 1/3 · 2^-1070 on the subnormal grid.
    let (one, three) = (BigInt::from(1), BigInt::from(3));
    assert_eq!(round_ratio(&one, &three, 0), Some(1.0 / 3.0));
    assert_eq!(round_ratio(&one, &three, -1070), Some(5.0 * tiny)); // 16/3 = 5.33 quanta
    assert_eq!(round_ratio(&-one.clone(), &three, -1070), Some(-5.0 * tiny));
    assert_eq!(
        round_ratio(&BigInt::from(5), &BigInt::from(2), -1074),
        Some(2.0 * tiny)
    ); // tie, even
    assert_eq!(
        round_ratio(&BigInt::from(7), &BigInt::from(2), -1074),
        Some(4.0 * tiny)
    );
}

fn spread_matrix(n: usize) -> Matrix<f64> {
    // Lower-triangular plus a dense coupling: eigenvalues −10^(−2..2) (the diagonal),
    // dyadic-friendly entries so the exact result is known to be representable.
    let mut data = vec![0.0; n * n];
    for i in 0..n {
        data[i * n + i] = -(10f64).powf(-2.0 + 4.0 * i as f64 / (n - 1) as f64);
        for j in 0..i {
            data[i * n + j] = ((i * 7 + j * 3) % 5) as f64 - 2.0;
        }
    }
    Matrix::from_row_major(n, n, data).unwrap()
}

#[test]
fn auto_and_exact_agree_and_exact_matches_the_product_of_the_diagonal() {
    // A triangular matrix's characteristic polynomial is Π (s − a_ii) (identity); the
    // exact path rounds once, so its constant term is the correctly rounded product.
    let a = spread_matrix(12);
    let (exact, _, acc) = faddeev_leverrier_f64(&a, Method::Exact, false).unwrap();
    assert_eq!(acc.method, "exact, rounded once");
    let diag: Vec<BigRational> = (0..12)
        .map(|i| BigRational::from_float(*a.get(i, i)).unwrap())
        .collect();
    let product = diag.iter().fold(q(1, 1), |acc, d| acc * (-d.clone()));
    let (auto, _, _) = faddeev_leverrier_f64(&a, Method::Auto, false).unwrap();
    assert_eq!(auto, exact);
    let reference: f64 = {
        use num_traits::ToPrimitive;
        product.to_f64().unwrap()
    };
    assert!((exact[12] - reference).abs() <= f64::EPSILON * reference.abs());
}

/// realize_batch's in-place controllable canonical form against single `realize_f64`
/// calls (the batch contract): equal bits, and the same error for the same index.
#[test]
fn controllable_batch_in_place_equals_single_calls_bit_for_bit() {
    use crate::batch::realize_batch;
    let mut rng = Lcg(5);
    let mut value = || (rng.next() as f64 / (1u64 << 53) as f64) * 2.0 - 1.0;
    for (n, k) in [(8, 9), (5, 3), (1, 2), (0, 1), (4, 5)] {
        let count = 13;
        let mut num: Vec<f64> = (0..count * k).map(|_| value()).collect();
        let mut den: Vec<f64> = (0..count * (n + 1)).map(|_| 1e3 * value()).collect();
        num[k..2 * k].iter_mut().for_each(|x| *x = 0.0); // zero numerator
        num[2 * k] = 0.0; // a leading zero
        den[3 * (n + 1)] = 1e-300; // huge coefficients after normalising (finite or not)
        let r = realize_batch(&num, k, &den, n + 1, count, Form::ControllableCanonical);
        let single = |num: &[f64], den: &[f64], i: usize| {
            realize_f64(
                &num[i * k..(i + 1) * k],
                &den[i * (n + 1)..(i + 1) * (n + 1)],
                Form::ControllableCanonical,
            )
        };
        match r {
            Ok(r) => {
                for i in 0..count {
                    let (ss, _) = single(&num, &den, i).unwrap();
                    let bits = |x: &[f64]| x.iter().map(|v| v.to_bits()).collect::<Vec<_>>();
                    assert_eq!(
                        bits(&r.a[i * n * n..(i + 1) * n * n]),
                        bits(ss.a.as_slice()),
                        "a {i}"
                    );
                    assert_eq!(
                        bits(&r.b[i * n..(i + 1) * n]),
                        bits(ss.b.as_slice()),
                        "b {i}"
                    );
                    assert_eq!(
                        bits(&r.c[i * n..(i + 1) * n]),
                        bits(ss.c.as_slice()),
                        "c {i}"
                    );
                    assert_eq!(r.d[i].to_bits(), ss.d.as_slice()[0].to_bits(), "d {i}");
                }
            }
            Err(err) => {
                let first = (0..count)
                    .find_map(|i| single(&num, &den, i).err().map(|e| (i, e)))
                    .unwrap();
                let want = ModelError::Batch {
                    index: first.0,
                    source: Box::new(first.1),
                };
                assert_eq!(err.to_string(), want.to_string());
            }
        }
        // Overflow of the normalisation and a NaN: the smallest index, the single call's error.
        den[3 * (n + 1)] = 1e-320;
        num[3 * k + k - 1] = 1e300;
        num[5 * k] = f64::NAN;
        let err = realize_batch(&num, k, &den, n + 1, count, Form::ControllableCanonical)
            .err()
            .unwrap();
        let want = ModelError::Batch {
            index: 3,
            source: Box::new(single(&num, &den, 3).err().unwrap()),
        };
        assert_eq!(err.to_string(), want.to_string());
    }
}

/// The certified batch (models in SIMD lanes) against single calls of
/// `transfer_function_f64(.., Method::Auto)` (the batch contract): equal bits for every
/// model, in full and ragged lane groups, for certified models and for models the bound
/// cannot certify (spread eigenvalues: the exact route runs), and the same error for the
/// same smallest failing index.
#[test]
fn certified_batch_equals_single_calls_bit_for_bit() {
    use crate::batch::transfer_function_batch;
    use crate::recover::certified_lanes::LANES;
    let mut rng = Lcg(99);
    let value = |rng: &mut Lcg| (rng.next() as f64 / (1u64 << 53) as f64) * 2.0 - 1.0;
    for (n, m, p) in [(6, 1, 1), (4, 2, 3), (1, 1, 1), (0, 1, 1)] {
        for count in [3 * LANES + 3, LANES, 1] {
            let mut models = Vec::new();
            for i in 0..count {
                let mut fill = |r: usize, c: usize| {
                    Matrix::from_row_major(r, c, (0..r * c).map(|_| value(&mut rng)).collect())
                        .unwrap()
                };
                let mut ss = StateSpace {
                    a: fill(n, n),
                    b: fill(n, m),
                    c: fill(p, n),
                    d: fill(p, m),
                };
                if i % 5 == 2 && n > 1 {
                    // Eigenvalues spread over eight decades: not certified, the exact route.
                    ss.a = spread_matrix(n);
                    for k in 0..n {
                        ss.a.set(k, k, -(10f64).powf(-4.0 + 8.0 * k as f64 / (n - 1) as f64));
                    }
                }
                if i % 7 == 3 && n > 0 {
                    ss.a.set(0, n - 1, 0.0); // zeros in some lanes only
                    ss.b.set(n - 1, 0, 0.0);
                }
                models.push(ss);
            }
            let stack = |f: &dyn Fn(&StateSpace<f64>) -> &Matrix<f64>| -> Vec<f64> {
                models
                    .iter()
                    .flat_map(|s| f(s).as_slice().to_vec())
                    .collect()
            };
            let (a, b, c, d) = (
                stack(&|s| &s.a),
                stack(&|s| &s.b),
                stack(&|s| &s.c),
                stack(&|s| &s.d),
            );
            let batch = transfer_function_batch(&a, &b, &c, &d, count, n, m, p).unwrap();
            let per_num = p * m * (n + 1);
            let mut fallbacks = 0;
            for (i, ss) in models.iter().enumerate() {
                let (num, den, acc) = transfer_function_f64(ss, Method::Auto).unwrap();
                fallbacks += usize::from(acc.method == "exact, rounded once");
                let bits = |x: &[f64]| x.iter().map(|v| v.to_bits()).collect::<Vec<_>>();
                assert_eq!(
                    bits(&batch.den[i * (n + 1)..(i + 1) * (n + 1)]),
                    bits(&den),
                    "den {i}"
                );
                assert_eq!(
                    bits(&batch.num[i * per_num..(i + 1) * per_num]),
                    bits(&num),
                    "num {i}"
                );
            }
            if n > 1 && count > 2 {
                assert!(
                    fallbacks > 0,
                    "the exact route was exercised ({n}, {m}, {p})"
                );
            }
            // A non-finite model: the batch names the smallest failing index with the
            // single call's error.
            if n > 0 && count > 2 {
                let mut bad_c = c.clone();
                bad_c[2 * p * n] = f64::INFINITY;
                let mut bad_a = a.clone();
                bad_a[(count - 1) * n * n] = f64::NAN;
                let err = transfer_function_batch(&bad_a, &b, &bad_c, &d, count, n, m, p)
                    .err()
                    .unwrap();
                let mut single = models[2].clone();
                single.c.set(0, 0, f64::INFINITY);
                let want = transfer_function_f64(&single, Method::Auto).err().unwrap();
                assert_eq!(
                    err.to_string(),
                    ModelError::Batch {
                        index: 2,
                        source: Box::new(want)
                    }
                    .to_string()
                );
            }
        }
    }
}

#[test]
fn transfer_function_float_matches_exact_rationals() {
    // (identity) the float routine on dyadic data equals the rational recursion, rounded.
    let num = [1.0, -0.5, 0.25, 3.0];
    let den = [1.0, 6.0, 11.0, 6.0];
    for form in COMPANION_FORMS {
        let (ss, _) = realize_f64(&num, &den, form).unwrap();
        for method in [Method::Auto, Method::Exact, Method::Recursion] {
            let (n_out, d_out, _) = transfer_function_f64(&ss, method).unwrap();
            assert_eq!(d_out, den.to_vec(), "{form:?} {method:?}");
            for (x, y) in n_out.iter().zip(&num) {
                assert!(
                    (x - y).abs() <= 8.0 * f64::EPSILON * y.abs().max(1.0),
                    "{form:?} {method:?}"
                );
            }
        }
    }
}

#[test]
fn modal_form_orders_poles_and_refuses_double_poles() {
    // 1/((s+1)(s+2)(s+3)) has poles −3, −2, −1: ascending real part (hand).
    let (ss, info) = realize_f64(&[1.0], &[1.0, 6.0, 11.0, 6.0], Form::Modal).unwrap();
    let diag: Vec<f64> = (0..3).map(|i| *ss.a.get(i, i)).collect();
    for (x, y) in diag.iter().zip([-3.0, -2.0, -1.0]) {
        assert!((x - y).abs() < 1e-12);
    }
    assert!(info.unwrap().eigenvector_condition < 1e3);
    // (s² + 2s + 5) has poles −1 ± 2j: block [[−1, 2], [−2, −1]] (hand).
    let (pair, _) = realize_f64(&[1.0], &[1.0, 2.0, 5.0], Form::Modal).unwrap();
    let expect = [-1.0, 2.0, -2.0, -1.0];
    for (x, y) in pair.a.as_slice().iter().zip(expect) {
        assert!((x - y).abs() < 1e-12);
    }
    match realize_f64(&[1.0], &[1.0, 2.0, 1.0], Form::Modal) {
        Err(ModelError::NoModalForm { detail }) => assert!(detail.contains("does not exist")),
        other => panic!("expected NoModalForm, got {other:?}"),
    }
}

#[test]
fn bad_float_input_is_refused_not_panicked() {
    assert_eq!(
        realize_f64(&[f64::NAN], &[1.0, 1.0], Form::Controller).unwrap_err(),
        ModelError::NonFinite { arg: "num" }
    );
    assert!(matches!(
        realize_f64(&[1.0], &[1e-300, 1e300], Form::Controller),
        Err(ModelError::Overflow { .. })
    ));
    let a = Matrix::from_row_major(2, 3, vec![0.0; 6]).unwrap();
    assert!(matches!(
        faddeev_leverrier_f64(&a, Method::Auto, true),
        Err(ModelError::Shape { arg: "a", .. })
    ));
}

mod structure {
    use crate::matrix::Matrix;
    use crate::state_space::StateSpace;
    use crate::structure::kalman::kalman_decomposition;
    use crate::structure::minimal::minimal_realization;
    use crate::structure::similarity::similarity;
    use crate::structure::staircase::{controllability_staircase, observability_staircase};

    fn m(rows: usize, cols: usize, v: &[f64]) -> Matrix<f64> {
        Matrix::from_row_major(rows, cols, v.to_vec()).unwrap()
    }

    /// A fixed orthogonal matrix: product of Givens rotations (deterministic, no RNG).
    fn rotation(n: usize) -> Matrix<f64> {
        let mut q = Matrix::identity(n);
        for (k, angle) in (0..n - 1).map(|k| (k, 0.3 + 0.7 * k as f64)) {
            let (c, s) = (angle.cos(), angle.sin());
            let mut g = Matrix::identity(n);
            g.set(k, k, c);
            g.set(k, k + 1, -s);
            g.set(k + 1, k, s);
            g.set(k + 1, k + 1, c);
            q = q.matmul(&g);
        }
        q
    }

    #[test]
    fn planted_uncontrollable_mode_is_found_behind_a_rotation() {
        // (identity) diag(−1, −2, −3) with B = [1; 1; 0]: mode −3 is not reachable.
        let a0 = m(3, 3, &[-1.0, 0.0, 0.0, 0.0, -2.0, 0.0, 0.0, 0.0, -3.0]);
        let b0 = m(3, 1, &[1.0, 1.0, 0.0]);
        let q = rotation(3);
        let (a, b) = (
            q.transpose().matmul(&a0).matmul(&q),
            q.transpose().matmul(&b0),
        );
        let s = controllability_staircase(&a, &b, None, None).unwrap();
        assert_eq!((s.rank, s.blocks.clone()), (2, vec![1, 1]));
        // (identity) QᵀQ = I and QᵀAQ = the returned A, with the zero block exactly zero.
        let qtq = s.q.transpose().matmul(&s.q);
        let id = Matrix::<f64>::identity(3);
        assert!(qtq
            .as_slice()
            .iter()
            .zip(id.as_slice())
            .all(|(x, y)| (x - y).abs() < 1e-14));
        let back = s.q.transpose().matmul(&a).matmul(&s.q);
        assert!(back
            .as_slice()
            .iter()
            .zip(s.a.as_slice())
            .all(|(x, y)| (x - y).abs() < 1e-13));
        assert_eq!(
            (*s.a.get(2, 0), *s.a.get(2, 1), *s.b.get(2, 0)),
            (0.0, 0.0, 0.0)
        );
        assert!((s.a.get(2, 2) + 3.0).abs() < 1e-13);
    }

    #[test]
    fn observability_is_the_dual() {
        // (identity) observability of (A, C) = controllability of (Aᵀ, Cᵀ).
        let a = m(3, 3, &[-1.0, 1.0, 0.0, 0.0, -2.0, 0.0, 0.0, 0.0, -3.0]);
        let c = m(1, 3, &[1.0, 0.0, 0.0]);
        let o = observability_staircase(&a, None, &c, None).unwrap();
        let d = controllability_staircase(&a.transpose(), &c.transpose(), None, None).unwrap();
        assert_eq!((o.rank, o.blocks), (d.rank, d.blocks));
        assert_eq!(o.rank, 2);
    }

    #[test]
    fn kalman_parts_of_a_diagonal_model() {
        // modes −1 (c, o), −2 (c, not o), −3 (not c, o), −4 (neither) (hand)
        let a = m(
            4,
            4,
            &[
                -1.0, 0.0, 0.0, 0.0, 0.0, -2.0, 0.0, 0.0, 0.0, 0.0, -3.0, 0.0, 0.0, 0.0, 0.0, -4.0,
            ],
        );
        let ss = StateSpace {
            a,
            b: m(4, 1, &[1.0, 1.0, 0.0, 0.0]),
            c: m(1, 4, &[1.0, 0.0, 1.0, 0.0]),
            d: m(1, 1, &[0.5]),
        };
        let k = kalman_decomposition(&ss, None).unwrap();
        assert_eq!(k.sizes, [1, 1, 1, 1]);
        let diag: Vec<f64> = (0..4).map(|i| *k.realization.a.get(i, i)).collect();
        for (x, y) in diag.iter().zip([-1.0, -2.0, -3.0, -4.0]) {
            assert!((x - y).abs() < 1e-12, "{diag:?}");
        }
        assert!(k.condition < 10.0);
        let min = minimal_realization(&ss, None).unwrap();
        assert_eq!(min.realization.n_states(), 1);
        assert!((min.realization.a.get(0, 0) + 1.0).abs() < 1e-12);
    }

    #[test]
    fn similarity_recovers_a_planted_transformation() {
        // (identity) r2 = r1.transform(T): A2 = T⁻¹A1T, B2 = T⁻¹B1, C2 = C1T.
        let a1 = m(2, 2, &[0.0, 1.0, -2.0, -3.0]);
        let (b1, c1, d) = (m(2, 1, &[0.0, 1.0]), m(1, 2, &[3.0, 1.0]), m(1, 1, &[0.0]));
        let t = m(2, 2, &[2.0, 1.0, 1.0, 1.0]); // T⁻¹ = [[1, −1], [−1, 2]]
        let ti = m(2, 2, &[1.0, -1.0, -1.0, 2.0]);
        let r1 = StateSpace {
            a: a1.clone(),
            b: b1.clone(),
            c: c1.clone(),
            d: d.clone(),
        };
        let r2 = StateSpace {
            a: ti.matmul(&a1).matmul(&t),
            b: ti.matmul(&b1),
            c: c1.matmul(&t),
            d,
        };
        let s = similarity(&r1, &r2, None).unwrap();
        assert!(s
            .t
            .as_slice()
            .iter()
            .zip(t.as_slice())
            .all(|(x, y)| (x - y).abs() < 1e-12));
    }
}

/// Property harness on the core's entry points: random, often malformed input (NaN, inf,
/// huge and tiny magnitudes, zeros, mismatched shapes) must give `Ok` or a `ModelError`,
/// never a panic, and every `Ok` float result must be finite. Deterministic generator, so a
/// failure reproduces; raise `CASES` for a longer run.
mod harness {
    use crate::batch::{realize_batch, transfer_function_batch};
    use crate::matrix::Matrix;
    use crate::realize::{realize_f64, Form};
    use crate::recover::{faddeev_leverrier_f64, transfer_function_f64, Method};
    use crate::state_space::StateSpace;
    use crate::structure::kalman::kalman_decomposition;
    use crate::structure::minimal::minimal_realization;
    use crate::structure::similarity::similarity;
    use crate::structure::staircase::{controllability_staircase, observability_staircase};

    const CASES: usize = 1500;

    struct Rng(super::Lcg);
    impl Rng {
        fn next(&mut self) -> u64 {
            self.0.next()
        }
        fn below(&mut self, n: usize) -> usize {
            self.0.below(n)
        }
        fn value(&mut self) -> f64 {
            match self.below(12) {
                0 => 0.0,
                1 => f64::NAN,
                2 => f64::INFINITY,
                3 => 1e300,
                4 => -1e-300,
                5 => 1.0,
                6 => -2.0,
                7 => f64::MIN_POSITIVE,
                _ => (self.next() as f64 / (1u64 << 53) as f64) * 20.0 - 10.0,
            }
        }
        fn vec(&mut self, len: usize) -> Vec<f64> {
            (0..len).map(|_| self.value()).collect()
        }
        fn matrix(&mut self, r: usize, c: usize) -> Matrix<f64> {
            let v = self.vec(r * c);
            Matrix::from_row_major(r, c, v).unwrap()
        }
    }

    fn finite(m: &[f64]) -> bool {
        m.iter().all(|v| v.is_finite())
    }

    #[test]
    fn core_entry_points_never_panic() {
        let forms: Vec<Form> = super::COMPANION_FORMS
            .iter()
            .copied()
            .chain([Form::Modal])
            .collect();
        let mut rng = Rng(super::Lcg(2026));
        for _ in 0..CASES {
            let (kn, kd) = (rng.below(6), rng.below(6));
            let (num, den) = (rng.vec(kn), rng.vec(kd));
            let form = forms[rng.below(forms.len())];
            if let Ok((ss, _)) = realize_f64(&num, &den, form) {
                assert!(
                    finite(ss.a.as_slice()) && finite(ss.b.as_slice()) && finite(ss.c.as_slice())
                );
            }
            let n = rng.below(5);
            let (m, p) = (rng.below(3), rng.below(3));
            // Shapes are right most of the time, wrong sometimes.
            let bad = rng.below(5) == 0;
            let a = rng.matrix(n, if bad { n + 1 } else { n });
            let b = rng.matrix(n, m);
            let c = rng.matrix(p, n);
            let d = rng.matrix(p, m);
            let method = [Method::Auto, Method::Exact, Method::Recursion][rng.below(3)];
            if let Ok((coeffs, _, _)) = faddeev_leverrier_f64(&a, method, rng.below(2) == 0) {
                assert!(finite(&coeffs));
            }
            let _ = controllability_staircase(&a, &b, Some(&c), None);
            let _ = observability_staircase(&a, Some(&b), &c, None);
            if let Ok(ss) = StateSpace::new(a.clone(), b.clone(), c.clone(), d.clone()) {
                if let Ok((nm, dn, _)) = transfer_function_f64(&ss, method) {
                    assert!(finite(&nm) && finite(&dn));
                }
                let _ = minimal_realization(&ss, None);
                let _ = kalman_decomposition(&ss, None);
                let _ = similarity(&ss, &ss, None);
                let _ = transfer_function_batch(
                    a.as_slice(),
                    b.as_slice(),
                    c.as_slice(),
                    d.as_slice(),
                    1,
                    n,
                    m,
                    p,
                );
            }
            let k = num.len().max(1);
            let d1 = den.len().max(1);
            if num.len() == k && den.len() == d1 {
                let _ = realize_batch(&num, k, &den, d1, 1, form);
            }
        }
    }
}
