//! Writes the invented demo data sets into a folder (default `demo-data`).
//!
//! Every value here is made up: nursery beds of tree seedlings over two seasons,
//! a few pig-feed production lots and a stability study of four tablet lots,
//! scenarios of our own. Nothing is measured.
//! The program uses only the standard library and its own seeded generator, so
//! the files come out byte for byte the same on every run and on every machine
//! that rounds `ln`, `sqrt` and `cos` the same way (values are rounded to one or
//! two decimals before they are written, which hides last-bit differences).
//!
//! Run: `cargo run --release --example demo_data -- demo-data`
//! or:  `rustc -O --edition 2021 examples/demo_data.rs -o /tmp/demo_data && /tmp/demo_data demo-data`

use std::env;
use std::fmt::Write as _;
use std::fs;
use std::path::Path;
use std::process::ExitCode;

/// Seeded pseudo-random numbers: xoshiro256** (Blackman & Vigna, 2018, "Scrambled
/// linear pseudorandom number generators"), its state filled by SplitMix64
/// (Steele, Lea & Flood, 2014), as its authors recommend. Our own few lines so
/// the example needs no crate and its output never changes with a crate update.
struct Rng {
    s: [u64; 4],
    /// Second normal from the last Box–Muller pair, handed out on the next call.
    spare: Option<f64>,
}

impl Rng {
    /// Fills the four state words from one seed with SplitMix64.
    fn new(seed: u64) -> Self {
        let mut z = seed;
        let mut next = || {
            z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut x = z;
            x = (x ^ (x >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            x = (x ^ (x >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            x ^ (x >> 31)
        };
        let s = [next(), next(), next(), next()];
        Rng { s, spare: None }
    }

    /// One xoshiro256** step.
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

    /// Uniform integer in 0..n (n small, so the modulo bias is negligible here).
    fn below(&mut self, n: usize) -> usize {
        (self.next_u64() % n as u64) as usize
    }

    /// Standard normal by the Box–Muller transform (Box & Muller, 1958).
    fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare.take() {
            return z;
        }
        // 1 - u lies in (0, 1], so the logarithm is finite.
        let u1 = 1.0 - self.uniform();
        let u2 = self.uniform();
        let r = (-2.0 * u1.ln()).sqrt();
        let theta = 2.0 * std::f64::consts::PI * u2;
        self.spare = Some(r * theta.sin());
        r * theta.cos()
    }

    /// Normal with the given mean and sd, redrawn until it falls in [lo, hi], so
    /// no seedling is 2 cm or 90 cm tall.
    fn normal_within(&mut self, mean: f64, sd: f64, lo: f64, hi: f64) -> f64 {
        loop {
            let v = mean + sd * self.normal();
            if (lo..=hi).contains(&v) {
                return v;
            }
        }
    }

    /// Shuffles in place (Fisher–Yates; Durstenfeld, 1964).
    fn shuffle<T>(&mut self, items: &mut [T]) {
        for i in (1..items.len()).rev() {
            let j = self.below(i + 1);
            items.swap(i, j);
        }
    }

    /// `count` distinct indices in 0..n, in increasing order.
    fn distinct(&mut self, count: usize, n: usize) -> Vec<usize> {
        let mut all: Vec<usize> = (0..n).collect();
        self.shuffle(&mut all);
        let mut picked = all[..count].to_vec();
        picked.sort_unstable();
        picked
    }
}

/// One nursery bed in one season: how many seedlings, and the line they follow.
struct Bed {
    name: &'static str,
    seedlings: usize,
    /// Dry mass (g) at height 0: only the line's position, not a real seedling.
    intercept: f64,
    /// Grams of dry mass per centimetre of height.
    slope: f64,
    height_mean: f64,
    height_sd: f64,
}

/// One invented season of the nursery: its beds and how the file gets messy.
struct Season {
    file: &'static str,
    seed: u64,
    beds: Vec<Bed>,
    /// Residual sd of dry mass around each bed's line, in grams.
    noise_sd: f64,
    /// Seedlings marked `damaged` (broken leader: shorter and lighter than the line says).
    damaged: usize,
    /// Seedlings per tray; trays are the `tray` column.
    tray_size: usize,
}

/// A row as the cells that will be written, so a cell can be blanked later.
struct Row {
    tray: String,
    bed: String,
    height: String,
    mass: String,
    status: &'static str,
}

/// Which cells of which rows go missing, and how they are spelled in the file.
/// Kept apart from the damaged rows so the drop counts by reason stay readable.
const MISSING_CELLS: [(Column, &str); 7] = [
    (Column::Mass, "NA"),
    (Column::Mass, "NA"),
    (Column::Mass, ""),
    (Column::Height, "NA"),
    (Column::Height, ""),
    (Column::Bed, ""),
    (Column::Bed, "NA"),
];

#[derive(Clone, Copy)]
enum Column {
    Bed,
    Height,
    Mass,
}

/// Builds one nursery season as CSV text.
fn nursery(season: &Season) -> String {
    let mut rng = Rng::new(season.seed);
    // Trays of one bed hold consecutive seedlings; the trays are then shuffled so
    // the beds interleave in the file, the way trays come back from the scales.
    let mut trays: Vec<Vec<Row>> = Vec::new();
    for bed in &season.beds {
        let mut left = bed.seedlings;
        while left > 0 {
            let take = left.min(season.tray_size);
            let mut tray = Vec::with_capacity(take);
            for _ in 0..take {
                let height = rng.normal_within(bed.height_mean, bed.height_sd, 8.0, 60.0);
                // Redraw the noise until the mass is positive (never needed with
                // these settings, but a negative mass would be absurd).
                let mass = loop {
                    let m = bed.intercept + bed.slope * height + season.noise_sd * rng.normal();
                    if m > 0.3 {
                        break m;
                    }
                };
                tray.push(Row {
                    tray: String::new(),
                    bed: bed.name.to_string(),
                    height: format!("{height:.1}"),
                    mass: format!("{mass:.2}"),
                    status: "measured",
                });
            }
            trays.push(tray);
            left -= take;
        }
    }
    rng.shuffle(&mut trays);
    let mut rows: Vec<Row> = Vec::new();
    for (t, tray) in trays.into_iter().enumerate() {
        for mut row in tray {
            row.tray = format!("T{:03}", t + 1);
            rows.push(row);
        }
    }

    let picked = rng.distinct(season.damaged + MISSING_CELLS.len(), rows.len());
    let (damaged, missing) = picked.split_at(season.damaged);
    for &i in damaged {
        let row = &mut rows[i];
        let h: f64 = row.height.parse().expect("height we just wrote");
        let m: f64 = row.mass.parse().expect("mass we just wrote");
        let h_factor = 0.45 + 0.2 * rng.uniform();
        let m_factor = 0.6 + 0.2 * rng.uniform();
        row.height = format!("{:.1}", h * h_factor);
        row.mass = format!("{:.2}", m * m_factor);
        row.status = "damaged";
    }
    for (&i, &(column, spelling)) in missing.iter().zip(MISSING_CELLS.iter()) {
        let row = &mut rows[i];
        let cell = match column {
            Column::Bed => &mut row.bed,
            Column::Height => &mut row.height,
            Column::Mass => &mut row.mass,
        };
        *cell = spelling.to_string();
    }

    let mut out = String::from("tray,bed,height_cm,dry_mass_g,status\n");
    for row in &rows {
        writeln!(
            out,
            "{},{},{},{},{}",
            row.tray, row.bed, row.height, row.mass, row.status
        )
        .expect("writing to a String cannot fail");
    }
    out
}

/// Invented pig-feed production lots: weight gain over the finishing period
/// against feed eaten, on a log scale of feed (gain flattens as intake grows).
fn feed_lots() -> String {
    // (lot, pigs, gain at ln(feed) = 5.5 in kg)
    let lots: [(&str, usize, f64); 3] = [
        ("lot-A", 24, 84.0),
        ("lot-B", 30, 88.5),
        ("lot-C", 27, 80.5),
    ];
    // Kilograms of gain per unit of ln(feed intake in kg), shared by all lots.
    let slope = 68.0;
    let noise_sd = 3.2;
    let mut rng = Rng::new(0x5EED_F00D_2026);
    let mut rows: Vec<(String, &str, String, String)> = Vec::new();
    for (lot, pigs, gain_at_centre) in lots {
        for _ in 0..pigs {
            let log_feed = rng.normal_within(5.5, 0.11, 5.2, 5.8);
            let feed = log_feed.exp();
            let gain = gain_at_centre + slope * (log_feed - 5.5) + noise_sd * rng.normal();
            rows.push((
                String::new(),
                lot,
                format!("{feed:.1}"),
                format!("{gain:.1}"),
            ));
        }
    }
    rng.shuffle(&mut rows);
    // One pen's feed record was lost: a missing covariate to show the drop count.
    let lost = rng.below(rows.len());
    rows[lost].2 = "NA".to_string();

    let mut out = String::from("pen,lot,feed_intake_kg,weight_gain_kg\n");
    for (i, (_, lot, feed, gain)) in rows.iter().enumerate() {
        writeln!(out, "P{:02},{lot},{feed},{gain}", i + 1)
            .expect("writing to a String cannot fail");
    }
    out
}

/// Invented stability study of a tablet: assay (% of label claim) of four
/// production lots at the pull points of a 24-month programme, two assays per pull.
/// The lots lose potency at one shared rate but start at slightly different levels
/// (each blend fills a little differently), so lot-pooling (ICH Q1E, 2003) pools
/// the slopes but not the intercepts, and the plan's lower limit of 95.0 % is
/// reached by the common-slope lines. The newest lot has no 24-month pull yet.
/// A generator of its own seed, so adding this file left the others' bytes as they were.
fn stability_lots() -> String {
    // (lot, assay at month 0 in % of label claim, last pull so far in months)
    let lots: [(&str, f64, u32); 4] = [
        ("TB-2601", 101.2, 24),
        ("TB-2602", 100.4, 24),
        ("TB-2603", 101.9, 24),
        ("TB-2604", 99.8, 18),
    ];
    // Pull points in months (common practice for a long-term study, no source).
    let pulls = [0u32, 3, 6, 9, 12, 18, 24];
    // Loss of assay per month, shared by all lots, and the assay's noise sd (both %).
    let slope = -0.15;
    let noise_sd = 0.4;
    let mut rng = Rng::new(0x57AB_2026);
    let mut out = String::from("lot,months,replicate,assay_pct\n");
    for (lot, start, last) in lots {
        for month in pulls.into_iter().filter(|&m| m <= last) {
            for replicate in 1..=2 {
                let assay = start + slope * f64::from(month) + noise_sd * rng.normal();
                writeln!(out, "{lot},{month},{replicate},{assay:.1}")
                    .expect("writing to a String cannot fail");
            }
        }
    }
    out
}

/// Invented three-attribute stability study of a film-coated tablet: three lots
/// pulled at months 0–18, two tablets per pull, each tested for assay (% of label
/// claim, limits 95.0–105.0), a degradation product (% of assay, at most 0.50) and
/// hardness (N, at least 40). Assay falls slowly, the degradant grows and reaches
/// its limit first, and the tablets harden a little on storage, so hardness never
/// approaches its lower limit. One hardness test at month 9 of lot FC-03 was not
/// done (left empty), so that attribute uses one row fewer. Its own seed, so the
/// other files keep their bytes.
fn three_attributes() -> String {
    // (lot, assay at month 0, degradant at month 0, hardness at month 0)
    let lots: [(&str, f64, f64, f64); 3] = [
        ("FC-01", 100.6, 0.06, 62.0),
        ("FC-02", 99.9, 0.08, 59.5),
        ("FC-03", 100.9, 0.05, 64.0),
    ];
    let pulls = [0u32, 3, 6, 9, 12, 18];
    // Change per month, and the noise sd, of each attribute.
    let (assay_slope, assay_sd) = (-0.11, 0.35);
    let (degradant_slope, degradant_sd) = (0.018, 0.012);
    let (hardness_slope, hardness_sd) = (0.35, 1.2);
    let mut rng = Rng::new(0x3A77_2026);
    let mut out = String::from("lot,months,tablet,assay_pct,degradant_pct,hardness_n\n");
    for (lot, assay0, degradant0, hardness0) in lots {
        for month in pulls {
            for tablet in 1..=2 {
                let m = f64::from(month);
                let assay = assay0 + assay_slope * m + assay_sd * rng.normal();
                let degradant =
                    (degradant0 + degradant_slope * m + degradant_sd * rng.normal()).max(0.0);
                let hardness = hardness0 + hardness_slope * m + hardness_sd * rng.normal();
                let hardness = if lot == "FC-03" && month == 9 && tablet == 2 {
                    String::new()
                } else {
                    format!("{hardness:.1}")
                };
                writeln!(
                    out,
                    "{lot},{month},{tablet},{assay:.1},{degradant:.3},{hardness}"
                )
                .expect("writing to a String cannot fail");
            }
        }
    }
    out
}

/// The two nursery seasons. 2025: all beds share one slope (parallel lines, so
/// the equal-slopes gate passes). 2026: the shade bed's seedlings stretch for
/// light and gain little mass per centimetre, so its slope is clearly lower and
/// the gate fails.
fn seasons() -> [Season; 2] {
    let bed = |name, seedlings, intercept, slope, height_mean, height_sd| Bed {
        name,
        seedlings,
        intercept,
        slope,
        height_mean,
        height_sd,
    };
    [
        Season {
            file: "nursery-2025.csv",
            seed: 0x2025_5EED,
            beds: vec![
                bed("north-1", 88, -1.60, 0.30, 27.0, 5.5),
                bed("north-2", 104, -0.90, 0.30, 29.0, 6.0),
                bed("south-1", 76, 0.40, 0.30, 32.0, 6.5),
                bed("shade-1", 115, -2.70, 0.30, 34.0, 6.0),
            ],
            noise_sd: 0.85,
            damaged: 6,
            tray_size: 12,
        },
        Season {
            file: "nursery-2026.csv",
            seed: 0x2026_5EED,
            beds: vec![
                bed("north-1", 92, -1.40, 0.31, 27.5, 5.5),
                bed("north-2", 99, -0.70, 0.31, 29.5, 6.0),
                bed("south-1", 68, 0.60, 0.31, 31.5, 6.5),
                bed("shade-1", 118, 1.10, 0.17, 34.5, 6.0),
            ],
            noise_sd: 0.85,
            damaged: 7,
            tray_size: 12,
        },
    ]
}

fn main() -> ExitCode {
    let dir = env::args()
        .nth(1)
        .unwrap_or_else(|| "demo-data".to_string());
    let dir = Path::new(&dir);
    if let Err(e) = fs::create_dir_all(dir) {
        eprintln!("demo_data: cannot create folder {}: {e}", dir.display());
        return ExitCode::FAILURE;
    }
    let mut files: Vec<(&str, String)> = Vec::new();
    for season in seasons() {
        files.push((season.file, nursery(&season)));
    }
    files.push(("feed-lots-2026.csv", feed_lots()));
    files.push(("stability-lots-2026.csv", stability_lots()));
    files.push(("tablet-attributes-2026.csv", three_attributes()));
    for (name, text) in files {
        let path = dir.join(name);
        if let Err(e) = fs::write(&path, text.as_bytes()) {
            eprintln!("demo_data: cannot write {}: {e}", path.display());
            return ExitCode::FAILURE;
        }
        let rows = text.lines().count() - 1;
        println!("wrote {} ({rows} rows)", path.display());
    }
    ExitCode::SUCCESS
}
