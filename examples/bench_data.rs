//! Writes a large invented CSV for the benchmark: `bench_data ROWS OUT.csv`.
//!
//! Columns `group,x,y`: eight groups `g1`..`g8`, each with its own line (slopes
//! and intercepts differ, so the equal-slopes gate has work to do), normal noise,
//! a fixed seed, so the same ROWS always gives the same bytes. Synthetic numbers,
//! no real measurement behind them.
//!
//! Only the standard library: the benchmark must not depend on a crate that
//! could change the file between versions. Floats are written with four decimals
//! by our own integer formatting, because `format!` of f64 would make the
//! generator, not the program under test, the slow part at 10M rows.
//!
//! Run: `cargo run --release --example bench_data -- 1000000 bench/data/bench-1m.csv`

use std::env;
use std::fs::File;
use std::io::{BufWriter, Write};
use std::process::ExitCode;

/// Lines the groups follow: (intercept, slope), one per group g1..g8.
const LINES: [(f64, f64); 8] = [
    (10.0, 0.50),
    (12.0, 0.55),
    (9.0, 0.60),
    (14.0, 0.48),
    (11.0, 0.70),
    (8.0, 0.52),
    (13.0, 0.65),
    (10.5, 0.58),
];

/// Residual sd around each line.
const NOISE_SD: f64 = 3.0;

/// Group labels, written as bytes to skip formatting.
const LABELS: [&[u8]; 8] = [b"g1", b"g2", b"g3", b"g4", b"g5", b"g6", b"g7", b"g8"];

/// xoshiro256** (Blackman & Vigna, 2018) seeded by SplitMix64 (Steele, Lea &
/// Flood, 2014): fast, and ours, so the file never changes with a crate update.
struct Rng {
    s: [u64; 4],
}

impl Rng {
    fn new(seed: u64) -> Self {
        let mut z = seed;
        let mut next = || {
            z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut x = z;
            x = (x ^ (x >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            x = (x ^ (x >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            x ^ (x >> 31)
        };
        Rng {
            s: [next(), next(), next(), next()],
        }
    }

    fn next_u64(&mut self) -> u64 {
        let result = self.s[1].wrapping_mul(5).rotate_left(7).wrapping_mul(9);
        let t = self.s[1] << 17;
        self.s[2] ^= self.s[0];
        self.s[3] ^= self.s[1];
        self.s[1] ^= self.s[2];
        self.s[0] ^= self.s[3];
        self.s[2] ^= t;
        self.s[3] = self.s[3].rotate_left(45);
        result
    }

    /// Uniform on [0, 1) from the top 53 bits (common practice, no source).
    fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 * (1.0 / (1u64 << 53) as f64)
    }

    /// A pair of independent standard normals (Box & Muller, 1958).
    fn normal_pair(&mut self) -> (f64, f64) {
        let u1 = 1.0 - self.uniform(); // in (0, 1], so ln is finite
        let u2 = self.uniform();
        let r = (-2.0 * u1.ln()).sqrt();
        let (s, c) = (2.0 * std::f64::consts::PI * u2).sin_cos();
        (r * c, r * s)
    }
}

/// Appends `v` with exactly four decimals. Rounds half away from zero; the
/// values here stay far below 2^53 / 10^4, so the integer path is exact enough.
fn push_fixed4(buf: &mut Vec<u8>, v: f64) {
    let scaled = (v * 10_000.0).round() as i64;
    if scaled < 0 {
        buf.push(b'-');
    }
    let a = scaled.unsigned_abs();
    push_uint(buf, a / 10_000);
    buf.push(b'.');
    let frac = a % 10_000;
    buf.extend_from_slice(&[
        b'0' + (frac / 1000) as u8,
        b'0' + (frac / 100 % 10) as u8,
        b'0' + (frac / 10 % 10) as u8,
        b'0' + (frac % 10) as u8,
    ]);
}

/// Appends an unsigned integer in decimal.
fn push_uint(buf: &mut Vec<u8>, mut n: u64) {
    let mut digits = [0u8; 20];
    let mut i = digits.len();
    loop {
        i -= 1;
        digits[i] = b'0' + (n % 10) as u8;
        n /= 10;
        if n == 0 {
            break;
        }
    }
    buf.extend_from_slice(&digits[i..]);
}

/// Writes `rows` data rows to `path`.
fn write(rows: u64, path: &str) -> std::io::Result<()> {
    let file = File::create(path)?;
    let mut out = BufWriter::with_capacity(1 << 20, file);
    let mut rng = Rng::new(0xB3AC_0DA7_A5EE_D001);
    let mut line = Vec::with_capacity(64);
    out.write_all(b"group,x,y\n")?;
    for _ in 0..rows {
        // The top three bits pick the group: uniform over eight groups.
        let g = (rng.next_u64() >> 61) as usize;
        let x = 100.0 * rng.uniform();
        // One normal per row keeps the code simple; the second of the pair is
        // thrown away, a small cost next to the formatting.
        let (z, _) = rng.normal_pair();
        let (a, b) = LINES[g];
        let y = a + b * x + NOISE_SD * z;
        line.clear();
        line.extend_from_slice(LABELS[g]);
        line.push(b',');
        push_fixed4(&mut line, x);
        line.push(b',');
        push_fixed4(&mut line, y);
        line.push(b'\n');
        out.write_all(&line)?;
    }
    out.flush()
}

fn main() -> ExitCode {
    let args: Vec<String> = env::args().collect();
    if args.len() != 3 {
        eprintln!("usage: bench_data ROWS OUT.csv   (ROWS may use _ separators, e.g. 10_000_000)");
        return ExitCode::from(2);
    }
    let rows: u64 = match args[1].replace('_', "").parse() {
        Ok(n) => n,
        Err(e) => {
            eprintln!(
                "bench_data: ROWS must be a whole number, got {:?}: {e}",
                args[1]
            );
            return ExitCode::from(2);
        }
    };
    match write(rows, &args[2]) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("bench_data: cannot write {}: {e}", args[2]);
            ExitCode::FAILURE
        }
    }
}
