//! Progress on a terminal: bars and spinners for long runs, hidden when standard error is not
//! a terminal or `--quiet` is given.

use std::io::IsTerminal;
use std::time::Duration;

use indicatif::{ProgressBar, ProgressStyle};

fn visible(quiet: bool) -> bool {
    !quiet && std::io::stderr().is_terminal()
}

/// A bar of `len` steps labelled `message`; hidden when quiet or not on a terminal.
pub fn bar(len: u64, message: &str, quiet: bool) -> ProgressBar {
    if !visible(quiet) {
        return ProgressBar::hidden();
    }
    let style = ProgressStyle::with_template("{msg:>12} [{bar:36}] {pos}/{len} {elapsed_precise}")
        .unwrap_or_else(|_| ProgressStyle::default_bar())
        .progress_chars("=> ");
    ProgressBar::new(len)
        .with_style(style)
        .with_message(message.to_string())
}

/// A spinner labelled `message` for work of unknown length; hidden when quiet or not on a
/// terminal. Call `finish_and_clear` when done.
pub fn spinner(message: &str, quiet: bool) -> ProgressBar {
    if !visible(quiet) {
        return ProgressBar::hidden();
    }
    let style = ProgressStyle::with_template("{spinner} {msg} {elapsed}")
        .unwrap_or_else(|_| ProgressStyle::default_spinner());
    let pb = ProgressBar::new_spinner()
        .with_style(style)
        .with_message(message.to_string());
    pb.enable_steady_tick(Duration::from_millis(120));
    pb
}

#[cfg(test)]
mod tests {
    #[test]
    fn quiet_bars_are_hidden() {
        assert!(super::bar(10, "x", true).is_hidden());
        assert!(super::spinner("x", true).is_hidden());
    }
}
