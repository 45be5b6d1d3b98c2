//! Records what built this binary, for the provenance of every report: the commit
//! of the source tree (`git rev-parse HEAD`; "unknown" when built outside a git
//! checkout, such as from a source archive, unless SLOPEWISE_BUILD_COMMIT names it)
//! and the compiler (`rustc -V`).
//!
//! Cargo reruns this script when HEAD or the branch it points at moves, so the
//! recorded commit follows new commits without a clean build.

use std::path::{Path, PathBuf};
use std::process::Command;

fn git(args: &[&str]) -> Option<String> {
    let dir = std::env::var_os("CARGO_MANIFEST_DIR")?;
    // A CI runner may own the checkout as another user; trusting this one folder
    // on the command line keeps git from refusing it ("dubious ownership").
    let trust = format!("safe.directory={}", Path::new(&dir).display());
    let out = Command::new("git")
        .current_dir(&dir)
        .args(["-c", &trust])
        .args(args)
        .output()
        .ok()?;
    let text = String::from_utf8(out.stdout).ok()?.trim().to_string();
    (out.status.success() && !text.is_empty()).then_some(text)
}

fn main() {
    // A build from a source archive can name its commit through the environment.
    println!("cargo:rerun-if-env-changed=SLOPEWISE_BUILD_COMMIT");
    let commit = std::env::var("SLOPEWISE_BUILD_COMMIT")
        .ok()
        .filter(|c| !c.trim().is_empty())
        .or_else(|| git(&["rev-parse", "HEAD"]))
        .unwrap_or_else(|| "unknown".into());
    println!("cargo:rustc-env=SLOPEWISE_BUILD_COMMIT={commit}");

    let rustc = std::env::var_os("RUSTC").unwrap_or_else(|| "rustc".into());
    let rustc_version = Command::new(rustc)
        .arg("-V")
        .output()
        .ok()
        .filter(|o| o.status.success())
        .and_then(|o| String::from_utf8(o.stdout).ok())
        .map(|s| s.trim().to_string())
        .filter(|s| !s.is_empty())
        .unwrap_or_else(|| "unknown".into());
    println!("cargo:rustc-env=SLOPEWISE_RUSTC_VERSION={rustc_version}");

    println!("cargo:rerun-if-changed=build.rs");
    // In a worktree HEAD lives in the worktree's git dir and the branch refs in the
    // common one; watch both, and packed-refs for refs git has packed.
    let absolute = |p: String| -> PathBuf {
        let p = PathBuf::from(p);
        if p.is_absolute() {
            p
        } else {
            Path::new(&std::env::var("CARGO_MANIFEST_DIR").unwrap_or_default()).join(p)
        }
    };
    // Only files that exist: cargo reruns the script every build for a missing one.
    // logs/HEAD grows with every commit and checkout, even when the branch's ref is
    // packed and no loose ref file exists yet.
    if let Some(git_dir) = git(&["rev-parse", "--git-dir"]).map(absolute) {
        let common = git(&["rev-parse", "--git-common-dir"])
            .map(absolute)
            .unwrap_or_else(|| git_dir.clone());
        let mut watch = vec![
            git_dir.join("HEAD"),
            git_dir.join("logs/HEAD"),
            common.join("packed-refs"),
        ];
        if let Some(branch) = git(&["symbolic-ref", "-q", "HEAD"]) {
            watch.push(common.join(branch));
        }
        for path in watch.iter().filter(|p| p.exists()) {
            println!("cargo:rerun-if-changed={}", path.display());
        }
    }
}
