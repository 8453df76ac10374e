//! Interruptions (Ctrl-C, SIGTERM, SIGHUP) that never split a result set:
//! outside a commit they end the process at once, as before (staged files
//! are temporary and the next run clears them); during a commit's renames
//! they are held until the set is whole.

use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};

/// Commits in progress.
static COMMITTING: AtomicUsize = AtomicUsize::new(0);
/// An interruption arrived during a commit.
static PENDING: AtomicBool = AtomicBool::new(false);

/// Exit status of a run ended by an interruption (128 + SIGINT, the shell's convention).
const INTERRUPTED: i32 = 130;

#[cfg(unix)]
extern "C" fn on_signal(_: libc::c_int) {
    if COMMITTING.load(Ordering::SeqCst) > 0 {
        PENDING.store(true, Ordering::SeqCst);
    } else {
        // SAFETY: _exit is async-signal-safe.
        unsafe { libc::_exit(INTERRUPTED) };
    }
}

/// Installs the handler (once, at start-up).
pub fn install() {
    #[cfg(unix)]
    for sig in [libc::SIGINT, libc::SIGTERM, libc::SIGHUP] {
        // SAFETY: the handler only touches atomics and calls _exit, both
        // async-signal-safe; installed before any worker thread starts.
        unsafe {
            libc::signal(sig, on_signal as *const () as libc::sighandler_t);
        }
    }
}

/// Runs `f` with interruptions held until it returns.
pub fn uninterrupted<T>(f: impl FnOnce() -> T) -> T {
    COMMITTING.fetch_add(1, Ordering::SeqCst);
    let out = f();
    if COMMITTING.fetch_sub(1, Ordering::SeqCst) == 1 && PENDING.load(Ordering::SeqCst) {
        std::process::exit(INTERRUPTED);
    }
    out
}
