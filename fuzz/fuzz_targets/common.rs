//! What the fuzz targets share: a plan chosen by the input's first byte, so one
//! corpus explores filters, levels, transforms and delimiters along with the CSV.

use slopewise::plan::{self, Plan};

/// Splits the input into (plan selector, CSV bytes).
pub fn split(data: &[u8]) -> Option<(u8, &[u8])> {
    let (&first, rest) = data.split_first()?;
    Some((first, rest))
}

/// The plan the selector bits ask for; every variant is a valid plan.
pub fn plan_for(selector: u8) -> Plan {
    let mut data = String::from("path = \"d.csv\"\nmissing = [\"\", \"NA\"]\n");
    data.push_str(match (selector >> 3) & 3 {
        0 => "",
        1 => "delimiter = \";\"\n",
        2 => "delimiter = \"tab\"\n",
        _ => "delimiter = \"|\"\n",
    });
    if selector & 4 != 0 {
        data.push_str("[[data.keep]]\ncolumn = \"g\"\none_of = [\"a\", \"b\"]\n");
    }
    let mut model = String::from("response = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n");
    if selector & 1 != 0 {
        model.push_str("levels = [\"a\", \"b\", \"c\"]\n");
    }
    if selector & 0x20 != 0 {
        model.push_str("adjust_at = 1.5\n");
    }
    let mut transform = String::new();
    if selector & 2 != 0 {
        transform.push_str("response = \"log\"\n");
    }
    if selector & 0x40 != 0 {
        transform.push_str("covariate = \"sqrt\"\n");
    }
    if !transform.is_empty() {
        model.push_str("[model.transform]\n");
        model.push_str(&transform);
    }
    let tests = if selector & 0x80 != 0 {
        "[tests]\ncomparisons = \"bonferroni\"\nslopes_alpha = 0.5\n"
    } else {
        ""
    };
    let text = format!("title = \"fuzz\"\n[data]\n{data}[model]\n{model}{tests}");
    plan::load("fuzz.toml", &text).expect("every selector gives a valid plan")
}
