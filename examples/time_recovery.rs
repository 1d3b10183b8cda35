//! Times the float transfer-function recovery of order-8 companion models in the core alone
//! (no Python): `cargo run --release --example time_recovery`.

use statewright::realize::{realize_f64, Form};
use statewright::recover::{certified, transfer_function_f64, Method};
use std::time::Instant;

fn main() {
    let mut seed = 12345u64;
    let mut next = move || {
        seed = seed
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((seed >> 11) as f64 / (1u64 << 53) as f64) * 2.0 - 1.0
    };
    let models: Vec<_> = (0..20000)
        .map(|_| {
            let mut den = vec![1.0];
            den.extend((0..8).map(|_| next()));
            let num: Vec<f64> = (0..9).map(|_| next()).collect();
            realize_f64(&num, &den, Form::ControllableCanonical)
                .unwrap()
                .0
        })
        .collect();
    for method in [Method::Recursion, Method::Auto] {
        let t = Instant::now();
        let mut sink = 0.0;
        for ss in &models {
            sink += transfer_function_f64(ss, method).unwrap().1[3];
        }
        println!(
            "{method:?}: {:.2} us/model ({sink:.3})",
            t.elapsed().as_secs_f64() / models.len() as f64 * 1e6
        );
    }
    let t = Instant::now();
    let mut sink = 0.0;
    for ss in &models {
        sink += certified::certified_double_double(ss.a.as_slice(), 8, false, Some(ss)).coeffs[2];
    }
    let t2 = Instant::now();
    let mut sink2 = 0.0;
    for ss in &models {
        sink2 += plain(ss.a.as_slice(), 8)[2];
    }
    println!(
        "plain char poly, no bounds: {:.2} us/model ({sink2:.3})",
        t2.elapsed().as_secs_f64() / models.len() as f64 * 1e6
    );
    let t3 = Instant::now();
    let mut sink3 = 0.0;
    for ss in &models {
        sink3 += certified::certified_recursion::<f64>(ss.a.as_slice(), 8, false, None).coeffs[2];
    }
    println!(
        "f64 with bounds, char poly only: {:.2} us/model ({sink3:.3})",
        t3.elapsed().as_secs_f64() / models.len() as f64 * 1e6
    );
    let t4 = Instant::now();
    let mut sink4 = 0.0;
    for ss in &models {
        sink4 += certified::certified_double_double(ss.a.as_slice(), 8, false, None).coeffs[2];
    }
    println!(
        "dd with bounds, char poly only: {:.2} us/model ({sink4:.3})",
        t4.elapsed().as_secs_f64() / models.len() as f64 * 1e6
    );
    println!(
        "dd recursion alone: {:.2} us/model ({sink:.3})",
        t.elapsed().as_secs_f64() / models.len() as f64 * 1e6
    );
}

#[allow(dead_code)]
fn plain(a: &[f64], n: usize) -> Vec<f64> {
    let mut cur = vec![0.0; n * n];
    for i in 0..n {
        cur[i * n + i] = 1.0;
    }
    let mut prod = vec![0.0; n * n];
    let mut coeffs = vec![1.0];
    for k in 1..=n {
        prod.iter_mut().for_each(|v| *v = 0.0);
        for i in 0..n {
            for l in 0..n {
                let x = a[i * n + l];
                if x == 0.0 {
                    continue;
                }
                for j in 0..n {
                    prod[i * n + j] += x * cur[l * n + j];
                }
            }
        }
        let tr: f64 = (0..n).map(|i| prod[i * n + i]).sum();
        let ck = -tr / k as f64;
        for i in 0..n {
            prod[i * n + i] += ck;
        }
        coeffs.push(ck);
        std::mem::swap(&mut cur, &mut prod);
    }
    coeffs
}
