//! Containment for the reader libraries: a damaged file that makes polars or calamine panic is
//! reported as an unreadable file naming it, never an abort.
//!
//! The libraries run parts of a read on worker threads; a panic there is carried back to the
//! caller (rayon resumes it), where [`contain`] catches it. While a read is contained, the hook
//! installed by [`quiet_reader_panics`] keeps the library's own panic text off the terminal, since
//! the caller prints a clear message instead. Panics from anywhere else are reported as usual.

use std::any::Any;
use std::panic::{self, AssertUnwindSafe};
use std::path::Path;
use std::sync::atomic::{AtomicUsize, Ordering};
use std::sync::Once;

use crate::{DataError, Result};

/// How many contained reads are running (on any thread).
static CONTAINING: AtomicUsize = AtomicUsize::new(0);

/// Source paths of the libraries whose panics [`contain`] turns into messages.
const READER_CRATES: [&str; 2] = ["/polars", "/calamine"];

/// Installs, once per process, a panic hook that stays silent for a reader library's panic
/// during a contained read and hands every other panic to the hook that was there before.
pub fn quiet_reader_panics() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        let previous = panic::take_hook();
        panic::set_hook(Box::new(move |info| {
            let from_reader = info
                .location()
                .is_some_and(|at| READER_CRATES.iter().any(|c| at.file().contains(c)));
            if !(from_reader && CONTAINING.load(Ordering::SeqCst) > 0) {
                previous(info);
            }
        }));
    });
}

/// Runs a read by a reader library; a panic inside it becomes [`DataError::Parse`] naming
/// `path`, with what the library said and what to do.
pub(crate) fn contain<T>(path: &Path, format: &str, read: impl FnOnce() -> Result<T>) -> Result<T> {
    CONTAINING.fetch_add(1, Ordering::SeqCst);
    let outcome = panic::catch_unwind(AssertUnwindSafe(read));
    CONTAINING.fetch_sub(1, Ordering::SeqCst);
    outcome.unwrap_or_else(|payload| {
        Err(DataError::Parse {
            path: path.to_path_buf(),
            message: format!(
                "the {format} reader stopped on this file ({}); the file is damaged or written in a form it does not handle. Save it again from the program that wrote it, or export it as CSV",
                panic_text(payload.as_ref())
            ),
        })
    })
}

/// The message a panic carried, if it was text.
fn panic_text(payload: &(dyn Any + Send)) -> String {
    payload
        .downcast_ref::<&str>()
        .map(|s| (*s).to_string())
        .or_else(|| payload.downcast_ref::<String>().cloned())
        .unwrap_or_else(|| "no message".to_string())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_panic_inside_a_contained_read_names_the_file_and_what_to_do() {
        let err = contain(Path::new("damaged.parquet"), "Parquet", || -> Result<()> {
            panic!("offset + length <= self.length")
        })
        .expect_err("contained");
        let text = err.to_string();
        assert!(
            text.starts_with("damaged.parquet: the Parquet reader stopped"),
            "{text}"
        );
        assert!(text.contains("offset + length"), "{text}");
        assert!(text.contains("export it as CSV"), "{text}");
    }

    #[test]
    fn a_read_that_returns_is_passed_through() {
        let value = contain(Path::new("fine.parquet"), "Parquet", || Ok(7)).expect("ok");
        assert_eq!(value, 7);
    }
}
