//! Printing errors once and mapping them to the documented exit codes.

use std::process::ExitCode;

/// Exit code for bad input: a file or option the user must fix.
pub const BAD_INPUT: u8 = 2;
/// Exit code for any other failure.
pub const FAILURE: u8 = 1;

/// Marks an error as the user's input being wrong (exit code 2).
#[derive(Debug)]
pub struct BadInput(pub String);

impl std::fmt::Display for BadInput {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for BadInput {}

/// Wraps any displayable error as bad input.
pub fn bad_input(e: impl std::fmt::Display) -> anyhow::Error {
    anyhow::Error::new(BadInput(e.to_string()))
}

/// Prints the error chain on standard error and picks the exit code.
pub fn report(e: &anyhow::Error) -> ExitCode {
    eprintln!("error: {e}");
    for cause in e.chain().skip(1) {
        eprintln!("  caused by: {cause}");
    }
    if e.chain().any(|c| c.is::<BadInput>()) {
        ExitCode::from(BAD_INPUT)
    } else {
        ExitCode::from(FAILURE)
    }
}
