//! Exact quantiles of a stream that is too large to copy.
//!
//! A 10M-row run may not hold a second copy of a column (the memory target is 1.5
//! times the CSV), so order statistics are found by narrowing: count the values in
//! fixed bins between the current bounds, keep the bin that holds the wanted rank,
//! and repeat until few enough values remain to select among them directly. Each
//! round is one pass over the stream; two or three rounds are usual.

const DIRECT: usize = 1 << 16;
const BINS: usize = 4096;

/// The `k`-th smallest value (0-based) of the stream `values()`, which must yield the
/// same finite values on every call. `None` when the stream has fewer than k + 1.
pub fn order_statistic<I, F>(values: F, k: u64) -> Option<f64>
where
    I: Iterator<Item = f64>,
    F: Fn() -> I,
{
    let (mut lo, mut hi, mut n) = (f64::INFINITY, f64::NEG_INFINITY, 0u64);
    for v in values() {
        lo = lo.min(v);
        hi = hi.max(v);
        n += 1;
    }
    if k >= n {
        return None;
    }
    // Invariant: the wanted value lies in [lo, hi], and `below` values are < lo.
    let mut below = 0u64;
    let mut inside = n;
    loop {
        if inside as usize <= DIRECT || lo == hi {
            if lo == hi {
                return Some(lo);
            }
            let mut kept: Vec<f64> = values().filter(|v| *v >= lo && *v <= hi).collect();
            let idx = (k - below) as usize;
            let (_, nth, _) = kept.select_nth_unstable_by(idx, f64::total_cmp);
            return Some(*nth);
        }
        let width = (hi - lo) / BINS as f64;
        let bin = |v: f64| (((v - lo) / width) as usize).min(BINS - 1);
        let mut counts = vec![0u64; BINS];
        for v in values() {
            if v >= lo && v <= hi {
                counts[bin(v)] += 1;
            }
        }
        let mut acc = below;
        let mut chosen = BINS - 1;
        for (b, c) in counts.iter().enumerate() {
            if acc + c > k {
                chosen = b;
                break;
            }
            acc += c;
        }
        let new_lo = if chosen == 0 {
            lo
        } else {
            lo + width * chosen as f64
        };
        let new_hi = if chosen == BINS - 1 {
            hi
        } else {
            lo + width * (chosen + 1) as f64
        };
        // Values equal to the upper edge fall in the next bin; keep the range closed
        // by stepping just below it so no value is counted twice.
        let new_hi = if chosen == BINS - 1 {
            new_hi
        } else {
            prev_float(new_hi)
        };
        if new_lo >= lo && new_hi <= hi && (new_lo > lo || new_hi < hi) {
            below = acc;
            inside = counts[chosen];
            lo = new_lo;
            hi = new_hi.max(new_lo);
        } else {
            // The range cannot shrink further in floating point: select directly.
            inside = 0;
        }
    }
}

fn prev_float(x: f64) -> f64 {
    if x.is_finite() && x != 0.0 {
        let bits = x.to_bits();
        f64::from_bits(if x > 0.0 { bits - 1 } else { bits + 1 })
    } else {
        x
    }
}

/// Order statistics at several 0-based `ranks` in few passes: one pass for the range
/// (skipped when `range` is known), one histogram pass, one pass that keeps only the
/// bins holding a wanted rank. A bin too crowded to keep falls back to
/// [`order_statistic`] for its ranks.
pub fn order_statistics<I, F>(
    values: F,
    n: u64,
    range: Option<(f64, f64)>,
    ranks: &[u64],
) -> Vec<Option<f64>>
where
    I: Iterator<Item = f64>,
    F: Fn() -> I,
{
    if n as usize <= DIRECT {
        let mut all: Vec<f64> = values().collect();
        all.sort_by(f64::total_cmp);
        return ranks
            .iter()
            .map(|&k| all.get(k as usize).copied())
            .collect();
    }
    let (lo, hi) = range.unwrap_or_else(|| {
        values().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| {
            (a.min(v), b.max(v))
        })
    });
    if !(hi > lo) {
        return ranks.iter().map(|&k| (k < n).then_some(lo)).collect();
    }
    let width = (hi - lo) / BINS as f64;
    let bin = |v: f64| (((v - lo) / width) as usize).min(BINS - 1);
    let mut counts = vec![0u64; BINS];
    for v in values() {
        counts[bin(v)] += 1;
    }
    // Cumulative count below each bin, and the bin of each wanted rank.
    let mut below = vec![0u64; BINS + 1];
    for b in 0..BINS {
        below[b + 1] = below[b] + counts[b];
    }
    let bin_of = |k: u64| below.partition_point(|&c| c <= k) - 1;
    let mut wanted: Vec<usize> = ranks
        .iter()
        .filter(|&&k| k < n)
        .map(|&k| bin_of(k))
        .collect();
    wanted.sort_unstable();
    wanted.dedup();
    let kept: u64 = wanted.iter().map(|&b| counts[b]).sum();
    if kept as usize > 4 * DIRECT {
        return ranks.iter().map(|&k| order_statistic(&values, k)).collect();
    }
    let mut slot = vec![usize::MAX; BINS];
    for (i, &b) in wanted.iter().enumerate() {
        slot[b] = i;
    }
    let mut buckets: Vec<Vec<f64>> = wanted
        .iter()
        .map(|&b| Vec::with_capacity(counts[b] as usize))
        .collect();
    for v in values() {
        let s = slot[bin(v)];
        if s != usize::MAX {
            buckets[s].push(v);
        }
    }
    for bucket in &mut buckets {
        bucket.sort_by(f64::total_cmp);
    }
    ranks
        .iter()
        .map(|&k| {
            if k >= n {
                return None;
            }
            let b = bin_of(k);
            buckets[slot[b]].get((k - below[b]) as usize).copied()
        })
        .collect()
}

/// Quantiles at probabilities `qs` by linear interpolation between order statistics
/// (Hyndman & Fan 1996, definition 7): h = (n − 1) q. `range` is the values' (min,
/// max) when known.
pub fn quantiles<I, F>(values: F, n: u64, range: Option<(f64, f64)>, qs: &[f64]) -> Vec<f64>
where
    I: Iterator<Item = f64>,
    F: Fn() -> I,
{
    if n == 0 {
        return Vec::new();
    }
    let split = |q: f64| {
        let h = (n - 1) as f64 * q.clamp(0.0, 1.0);
        let low = h.floor() as u64;
        (low, h - low as f64)
    };
    let mut ranks = Vec::new();
    for &q in qs {
        let (low, _) = split(q);
        ranks.push(low);
        ranks.push((low + 1).min(n - 1));
    }
    let stats = order_statistics(values, n, range, &ranks);
    qs.iter()
        .enumerate()
        .filter_map(|(i, &q)| {
            let (_, frac) = split(q);
            let a = stats[2 * i]?;
            let b = stats[2 * i + 1]?;
            Some(if frac == 0.0 { a } else { a + frac * (b - a) })
        })
        .collect()
}

/// The quantile at probability `q` (see [`quantiles`]).
pub fn quantile<I, F>(values: F, n: u64, q: f64) -> Option<f64>
where
    I: Iterator<Item = f64>,
    F: Fn() -> I,
{
    quantiles(values, n, None, &[q]).first().copied()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sorted_quantile(mut v: Vec<f64>, q: f64) -> f64 {
        v.sort_by(f64::total_cmp);
        let h = (v.len() - 1) as f64 * q;
        let lo = h.floor() as usize;
        let frac = h - lo as f64;
        if lo + 1 < v.len() {
            v[lo] + frac * (v[lo + 1] - v[lo])
        } else {
            v[lo]
        }
    }

    #[test]
    fn matches_sorting_on_large_skewed_and_tied_streams() {
        // Invented streams, large enough to need the narrowing rounds.
        let n = 300_000u64;
        let skewed: Vec<f64> = (0..n)
            .map(|i| ((i * 7919) % 100_003) as f64)
            .map(|v| (v / 1000.0).exp())
            .collect();
        let tied: Vec<f64> = (0..n).map(|i| (i % 5) as f64).collect();
        // A stream crowded into one value, so the histogram bin overflows.
        let crowded: Vec<f64> = (0..n)
            .map(|i| if i % 10 == 0 { i as f64 } else { 7.0 })
            .collect();
        for data in [skewed, tied, crowded] {
            let qs = [0.0, 0.25, 0.5, 0.75, 0.9, 1.0];
            let together = quantiles(|| data.iter().copied(), n, None, &qs);
            for (i, q) in qs.iter().enumerate() {
                let got = quantile(|| data.iter().copied(), n, *q).unwrap();
                let want = sorted_quantile(data.clone(), *q);
                assert_eq!(got, want, "q = {q}");
                assert_eq!(together[i], want, "q = {q}");
            }
            let k = n / 3;
            let mut sorted = data.clone();
            sorted.sort_by(f64::total_cmp);
            assert_eq!(
                order_statistic(|| data.iter().copied(), k),
                Some(sorted[k as usize])
            );
        }
    }

    #[test]
    fn small_streams_and_edges() {
        let v = [3.0, 1.0, 2.0];
        assert_eq!(quantile(|| v.iter().copied(), 3, 0.5), Some(2.0));
        assert_eq!(quantile(|| v.iter().copied(), 3, 0.25), Some(1.5));
        assert_eq!(order_statistic(|| v.iter().copied(), 3), None);
        let same = [4.0; 10];
        assert_eq!(quantile(|| same.iter().copied(), 10, 0.3), Some(4.0));
    }
}
