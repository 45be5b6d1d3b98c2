//! The binary: run the command line, print any error once, set the exit status.

use std::process::ExitCode;

fn main() -> ExitCode {
    slopewise::app::main()
}
