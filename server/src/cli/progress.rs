//! Progress for long work, on stderr and only when stderr is a terminal (scripts see nothing).

use indicatif::{ProgressBar, ProgressStyle};
use std::io::IsTerminal;
use std::time::Duration;

/// A spinner with a message and the elapsed time, for work of unknown length.
pub struct Spinner(Option<ProgressBar>);

impl Spinner {
    pub fn start(msg: &str) -> Spinner {
        if !std::io::stderr().is_terminal() {
            return Spinner(None);
        }
        let pb = ProgressBar::new_spinner();
        if let Ok(style) = ProgressStyle::with_template("{spinner} {msg} ({elapsed})") {
            pb.set_style(style);
        }
        pb.set_message(msg.to_string());
        pb.enable_steady_tick(Duration::from_millis(120));
        Spinner(Some(pb))
    }

    pub fn finish(self) {
        if let Some(pb) = self.0 {
            pb.finish_and_clear();
        }
    }
}
