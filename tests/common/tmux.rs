//! Driving the real binary inside tmux: a detached session per run, `send-keys` to type,
//! `capture-pane` to read the screen. Used by the terminal end-to-end test and the crash trials
//! of the review screen; callers skip (with a message) when [`have_tmux`] is false.

use std::process::Command;
use std::time::{Duration, Instant};

/// Whether tmux is installed.
pub fn have_tmux() -> bool {
    Command::new("tmux").arg("-V").output().is_ok_and(|o| o.status.success())
}

/// A detached tmux session running one command; killed when dropped.
pub struct Session(String);

impl Session {
    /// Starts `command` in a new 100×30 session called `name`.
    pub fn start(name: &str, command: &str) -> Session {
        let ok = Command::new("tmux")
            .args(["new-session", "-d", "-s", name, "-x", "100", "-y", "30", command])
            .env("NO_COLOR", "1")
            .status()
            .unwrap()
            .success();
        assert!(ok, "tmux new-session failed");
        Session(name.to_string())
    }

    /// The visible screen now.
    pub fn screen(&self) -> String {
        let out = Command::new("tmux").args(["capture-pane", "-p", "-t", &self.0]).output().unwrap();
        String::from_utf8_lossy(&out.stdout).into_owned()
    }

    /// Waits (up to 20 s) until the screen shows `needle`, and returns it.
    pub fn wait_for(&self, needle: &str) -> String {
        let start = Instant::now();
        loop {
            let s = self.screen();
            if s.contains(needle) {
                return s;
            }
            assert!(start.elapsed() < Duration::from_secs(20), "timed out waiting for {needle:?}; screen:\n{s}");
            std::thread::sleep(Duration::from_millis(100));
        }
    }

    /// Sends tmux key names, one at a time.
    pub fn keys(&self, keys: &[&str]) {
        for k in keys {
            let ok = Command::new("tmux").args(["send-keys", "-t", &self.0, k]).status().unwrap().success();
            assert!(ok);
            std::thread::sleep(Duration::from_millis(60));
        }
    }

    /// Types `text` literally.
    pub fn literal(&self, text: &str) {
        let ok = Command::new("tmux").args(["send-keys", "-l", "-t", &self.0, text]).status().unwrap().success();
        assert!(ok);
        std::thread::sleep(Duration::from_millis(60));
    }

    /// The process id of the command in the pane.
    pub fn pid(&self) -> String {
        let out = Command::new("tmux").args(["display-message", "-p", "-t", &self.0, "#{pane_pid}"]).output().unwrap();
        String::from_utf8_lossy(&out.stdout).trim().to_string()
    }
}

impl Drop for Session {
    fn drop(&mut self) {
        let _ = Command::new("tmux").args(["kill-session", "-t", &self.0]).status();
    }
}
