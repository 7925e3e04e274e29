//! Driving the real binary inside tmux: a detached session per run, `send-keys` to type,
//! `capture-pane` to read the screen. Used by the terminal end-to-end test and the crash trials
//! of the review screen; callers skip (with a message) when [`have_tmux`] is false. Each session
//! runs on its own tmux server (`tmux -L orthoepy-test-PID-NAME`), so tests never touch a
//! person's sessions or each other's: with one server per test process, a session whose command
//! exited shut the server down while a test running beside it was starting its own session
//! ("server exited unexpectedly").

use std::process::Command;
use std::time::{Duration, Instant};

/// `tmux` on the server of the session called `name`, private to this test process.
fn tmux(name: &str) -> Command {
    let mut command = Command::new("tmux");
    command.args(["-L", &format!("orthoepy-test-{}-{name}", std::process::id())]);
    command
}

/// Whether tmux is installed.
pub fn have_tmux() -> bool {
    Command::new("tmux").arg("-V").output().is_ok_and(|o| o.status.success())
}

/// A detached tmux session running one command; killed when dropped.
pub struct Session(String);

impl Session {
    /// Starts `command` in a new 100×30 session called `name`.
    pub fn start(name: &str, command: &str) -> Session {
        let ok = tmux(name)
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
        let out = tmux(&self.0).args(["capture-pane", "-p", "-t", &self.0]).output().unwrap();
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
            let ok = tmux(&self.0).args(["send-keys", "-t", &self.0, k]).status().unwrap().success();
            assert!(ok);
            std::thread::sleep(Duration::from_millis(60));
        }
    }

    /// Types `text` literally.
    pub fn literal(&self, text: &str) {
        let ok = tmux(&self.0).args(["send-keys", "-l", "-t", &self.0, text]).status().unwrap().success();
        assert!(ok);
        std::thread::sleep(Duration::from_millis(60));
    }

    /// The process id of the command in the pane.
    pub fn pid(&self) -> String {
        let out = tmux(&self.0).args(["display-message", "-p", "-t", &self.0, "#{pane_pid}"]).output().unwrap();
        String::from_utf8_lossy(&out.stdout).trim().to_string()
    }
}

impl Drop for Session {
    fn drop(&mut self) {
        // The server is gone already when the session's command was killed; that is fine.
        let _ = tmux(&self.0).args(["kill-session", "-t", &self.0]).stderr(std::process::Stdio::null()).status();
    }
}
