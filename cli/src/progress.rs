//! Progress on stderr: one line at a time, rewritten in place on a terminal,
//! plain lines otherwise; nothing with --quiet.

use std::io::{IsTerminal, Write};
use std::sync::Mutex;

/// Hears each progress line (the Python package's callback).
pub type Listener = Box<dyn Fn(&str) + Send + Sync>;

pub struct Progress {
    quiet: bool,
    terminal: bool,
    last_len: Mutex<usize>,
    listener: Option<Listener>,
}

impl Progress {
    pub fn new(quiet: bool) -> Progress {
        Progress {
            quiet,
            terminal: std::io::stderr().is_terminal(),
            last_len: Mutex::new(0),
            listener: None,
        }
    }

    /// Progress that goes to `listener` instead of stderr.
    pub fn to(listener: Listener) -> Progress {
        Progress {
            listener: Some(listener),
            ..Progress::new(true)
        }
    }

    pub fn note(&self, msg: &str) {
        if let Some(l) = &self.listener {
            l(msg);
        }
        if self.quiet {
            return;
        }
        let mut err = std::io::stderr().lock();
        if self.terminal {
            let mut last = self.last_len.lock().unwrap_or_else(|p| p.into_inner());
            let pad = last.saturating_sub(msg.len());
            let _ = write!(err, "\r{msg}{}", " ".repeat(pad));
            *last = msg.len();
        } else {
            let _ = writeln!(err, "{msg}");
        }
    }

    /// Ends an in-place line so that what follows starts on its own line.
    pub fn finish(&self) {
        if !self.quiet && self.terminal {
            let _ = writeln!(std::io::stderr());
            if let Ok(mut l) = self.last_len.lock() {
                *l = 0;
            }
        }
    }
}
