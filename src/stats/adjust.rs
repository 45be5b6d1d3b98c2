//! Multiplicity adjustment of a family of p-values.
//!
//! Bonferroni (Dunn 1961): p·m, capped at 1. Holm (1979): sort ascending, multiply
//! the i-th smallest (1-based) by m − i + 1, carry the running maximum, cap at 1.

use crate::plan::Comparisons;

/// Adjusted p-values, in the order of `p`.
pub fn adjust(p: &[f64], method: Comparisons) -> Vec<f64> {
    let m = p.len() as f64;
    match method {
        // Tukey–Kramer does not adjust p-values: it replaces them by studentized range
        // tails, which the callers compute from t (see `p_tukey` in the results).
        // Many-to-one families are simultaneous over the differences' correlation,
        // which a list of p-values does not carry: see `analysis::pairwise`.
        Comparisons::None | Comparisons::TukeyKramer | Comparisons::AgainstReference => p.to_vec(),
        Comparisons::Bonferroni => p.iter().map(|v| (v * m).min(1.0)).collect(),
        Comparisons::Holm => {
            let mut order: Vec<usize> = (0..p.len()).collect();
            // Stable sort keeps ties in input order, so output never depends on chance.
            order.sort_by(|&a, &b| p[a].total_cmp(&p[b]));
            let mut out = vec![0.0; p.len()];
            let mut running = 0.0_f64;
            for (i, &idx) in order.iter().enumerate() {
                let v = ((m - i as f64) * p[idx]).min(1.0);
                running = running.max(v);
                out[idx] = running;
            }
            out
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn holm_worked_example() {
        // Holm (1979) step-down by hand (common practice, no source): sorted
        // 0.01, 0.02, 0.03, 0.04 -> 0.04, 0.06, 0.06 (running max), 0.06.
        let got = adjust(&[0.03, 0.01, 0.04, 0.02], Comparisons::Holm);
        let want = [0.06, 0.04, 0.06, 0.06];
        for (g, w) in got.iter().zip(want) {
            assert!((g - w).abs() < 1e-15, "{got:?}");
        }
    }

    #[test]
    fn bonferroni_caps_at_one() {
        assert_eq!(adjust(&[0.2, 0.5], Comparisons::Bonferroni), vec![0.4, 1.0]);
        assert_eq!(adjust(&[0.2, 0.5], Comparisons::None), vec![0.2, 0.5]);
    }
}
