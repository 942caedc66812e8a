//! Work off the UI thread: a job runs on its own thread and hands back one result, which the
//! frame loop picks up without blocking. Cancelling abandons the result (the thread finishes
//! its step and its answer is dropped), so the window never waits on a slow computation.

use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{self, Receiver};
use std::sync::Arc;
use std::time::{Duration, Instant};

use eframe::egui;

/// Wakes the frame loop when a job finishes (holds the window's context; empty without a
/// window, in tests and programs that poll by themselves).
#[derive(Debug, Clone, Default)]
pub struct Waker(Option<egui::Context>);

impl Waker {
    /// A waker for the window with `ctx`.
    pub fn new(ctx: egui::Context) -> Self {
        Self(Some(ctx))
    }

    /// Whether it has a window to wake.
    pub fn is_set(&self) -> bool {
        self.0.is_some()
    }

    /// A closure for [`Job::spawn`] that requests a repaint.
    pub fn hook(&self) -> impl Fn() + Send + 'static {
        let ctx = self.0.clone();
        move || {
            if let Some(c) = &ctx {
                c.request_repaint();
            }
        }
    }
}

/// One background computation.
#[derive(Debug)]
pub struct Job<T> {
    rx: Receiver<T>,
    started: Instant,
    cancelled: Arc<AtomicBool>,
}

impl<T: Send + 'static> Job<T> {
    /// Runs `work` on a new thread; `notify` is called after the result is sent (the app
    /// passes a repaint request so the frame loop wakes up).
    pub fn spawn(
        work: impl FnOnce(&AtomicBool) -> T + Send + 'static,
        notify: impl Fn() + Send + 'static,
    ) -> Self {
        let (tx, rx) = mpsc::channel();
        let cancelled = Arc::new(AtomicBool::new(false));
        let flag = Arc::clone(&cancelled);
        std::thread::spawn(move || {
            let out = work(&flag);
            if !flag.load(Ordering::Relaxed) {
                // The receiver may be gone (the job was replaced); nothing to do then.
                let _ = tx.send(out);
                notify();
            }
        });
        Self {
            rx,
            started: Instant::now(),
            cancelled,
        }
    }

    /// The result, once it is ready. `Some` at most once.
    pub fn poll(&mut self) -> Option<T> {
        self.rx.try_recv().ok()
    }

    /// Waits for the result (tests and the screenshot mode).
    pub fn wait(&mut self, limit: Duration) -> Option<T> {
        self.rx.recv_timeout(limit).ok()
    }

    /// Abandons the job: its result will not be delivered.
    pub fn cancel(&self) {
        self.cancelled.store(true, Ordering::Relaxed);
    }

    /// Time since the job started.
    pub fn elapsed(&self) -> Duration {
        self.started.elapsed()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn delivers_once_and_a_cancelled_job_delivers_nothing() {
        let mut job = Job::spawn(|_| 41 + 1, || {});
        assert_eq!(job.wait(Duration::from_secs(5)), Some(42));
        assert_eq!(job.poll(), None);
        let (go_tx, go_rx) = mpsc::channel::<()>();
        let mut slow = Job::spawn(
            move |_| {
                let _ = go_rx.recv();
                7
            },
            || {},
        );
        slow.cancel();
        let _ = go_tx.send(());
        assert_eq!(slow.wait(Duration::from_millis(300)), None);
    }
}
