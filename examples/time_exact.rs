//! Times the exact characteristic polynomial of float data (the fallback of `method="auto"`)
//! in the core alone: the multi-modular Hessenberg method side by side with the big-integer
//! Faddeev–LeVerrier recursion it replaced, and the cost estimate used for the time budget.
//! `cargo run --release --example time_exact`
//!
//! Models: A = T·diag(poles)·T⁻¹ with T standard-normal-like and poles spread over four
//! decades (every float entry then has its own exponent), as in `scripts/accuracy_report.py`;
//! and the same with each entry scaled by 2^±300 at random (entries spanning 600 binary orders).

use nalgebra::DMatrix;
use statewright::matrix::Matrix;
use statewright::recover::dyadic::DyadicMatrix;
use statewright::recover::faddeev_leverrier::faddeev_leverrier;
use statewright::recover::modular;
use std::time::Instant;

struct Lcg(u64);
impl Lcg {
    fn uniform(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
    fn normal(&mut self) -> f64 {
        // Box–Muller
        let (u, v) = (self.uniform().max(1e-300), self.uniform());
        (-2.0 * u.ln()).sqrt() * (2.0 * std::f64::consts::PI * v).cos()
    }
}

fn spread_model(n: usize, wide: bool, rng: &mut Lcg) -> Matrix<f64> {
    let t = DMatrix::from_fn(n, n, |_, _| rng.normal());
    let poles = DMatrix::from_diagonal(&nalgebra::DVector::from_fn(n, |_, _| {
        -(10f64.powf(rng.uniform() * 4.0 - 2.0))
    }));
    let a = &t * poles * t.clone().try_inverse().expect("random T is invertible");
    let data = (0..n * n)
        .map(|k| {
            let v = a[(k / n, k % n)];
            if wide {
                v * 2f64.powi(if rng.uniform() < 0.5 { -300 } else { 300 })
            } else {
                v
            }
        })
        .collect();
    Matrix::from_row_major(n, n, data).unwrap()
}

fn main() {
    let mut rng = Lcg(2026);
    println!("| n | entries | integer bits | coefficient bound bits | modular [ms] | estimate [ms] | big-integer recursion [ms] | ratio |");
    println!("| --- | --- | --- | --- | --- | --- | --- | --- |");
    for &(n, wide) in &[
        (10, false),
        (20, false),
        (30, false),
        (40, false),
        (64, false),
        (128, false),
        (256, false),
        (10, true),
        (20, true),
        (40, true),
    ] {
        let a = spread_model(n, wide, &mut rng);
        let dy = DyadicMatrix::from_f64(&a);
        let entry_bits = modular::max_entry_bits(&dy.m);
        let bound = modular::coefficient_bits(&dy.m);
        let estimate = modular::estimated_seconds(n, bound, entry_bits, 1);
        let started = Instant::now();
        let fast = modular::characteristic_polynomial(&dy.m);
        let modular_s = started.elapsed().as_secs_f64();
        // The big-integer recursion only where it finishes in reasonable time.
        let (slow_text, ratio_text) = if n <= 40 && (!wide || n <= 20) {
            let started = Instant::now();
            let (slow, _) = faddeev_leverrier(&dy.m);
            let slow_s = started.elapsed().as_secs_f64();
            assert_eq!(slow, fast, "both methods are exact");
            (
                format!("{:.1}", slow_s * 1e3),
                format!("{:.0}×", slow_s / modular_s),
            )
        } else {
            ("—".to_string(), "—".to_string())
        };
        println!(
            "| {n} | {} | {entry_bits} | {bound} | {:.1} | {:.1} | {slow_text} | {ratio_text} |",
            if wide { "spread, ×2^±300" } else { "spread" },
            modular_s * 1e3,
            estimate * 1e3
        );
    }

    // SISO transfer functions: coefficients and numerator terms C N_k B, the modular route
    // (Markov parameters modulo the same primes) beside the big-integer recursion with its
    // adjugate products (the route before).
    println!();
    println!("| n | SISO transfer function: modular [ms] | big-integer recursion [ms] | ratio |");
    println!("| --- | --- | --- | --- |");
    for n in [8, 16, 24, 40] {
        let a = DyadicMatrix::from_f64(&spread_model(n, false, &mut rng));
        let b = DyadicMatrix::from_f64(
            &Matrix::from_row_major(n, 1, (0..n).map(|_| rng.normal()).collect()).unwrap(),
        );
        let c = DyadicMatrix::from_f64(
            &Matrix::from_row_major(1, n, (0..n).map(|_| rng.normal()).collect()).unwrap(),
        );
        let started = Instant::now();
        let (coeffs, terms) = modular::transfer_terms(&a.m, &b.m, &c.m);
        let modular_s = started.elapsed().as_secs_f64();
        let started = Instant::now();
        let (slow_coeffs, adjugates) = faddeev_leverrier(&a.m);
        let slow_terms: Vec<_> = adjugates
            .iter()
            .map(|nk| c.m.matmul(&nk.matmul(&b.m)).get(0, 0).clone())
            .collect();
        let slow_s = started.elapsed().as_secs_f64();
        assert_eq!(
            (coeffs, terms),
            (slow_coeffs, slow_terms),
            "both routes are exact"
        );
        println!(
            "| {n} | {:.1} | {:.1} | {:.0}× |",
            modular_s * 1e3,
            slow_s * 1e3,
            slow_s / modular_s
        );
    }
}
