//! Progress bars: one factory, hidden when stderr is not a terminal or `--quiet` is set.

use std::io::IsTerminal;

use indicatif::{ProgressBar, ProgressStyle};

/// A bar of `len` steps with a message, or a hidden one.
pub fn bar(len: u64, message: &str, quiet: bool) -> ProgressBar {
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let pb = ProgressBar::new(len);
    if let Ok(style) = ProgressStyle::with_template("{msg} [{bar:30}] {pos}/{len} {elapsed}") {
        pb.set_style(style.progress_chars("=> "));
    }
    pb.set_message(message.to_string());
    pb
}
