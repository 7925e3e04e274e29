//! The hostile input corpus (`tests/hostile/`, described file by file in `tests/hostile/MANIFEST`):
//! every broken file is given to the real binary inside a small project, which must exit 2 with a
//! message naming the file, line and column where they apply, and the fix; never panic; and leave
//! the project folder byte for byte as it was. Files a reader reasonably accepts (a UTF-8 BOM, CRLF
//! line ends) must read correctly. Big or derived files (`generated-*`) are made here, not committed.
//! Expected places are counted by hand on each file; namespaces and DTD rules are W3C PLS 1.0 and
//! XML 1.0; the CSV rules are RFC 4180.

mod common;

use common::cli::{bin, write_project};
use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

const CORPUS: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/hostile");
const TEN_MIB: usize = 10 << 20;

struct Case {
    file: String,
    place: String,
    command: String,
    expect: String,
}

fn manifest() -> Vec<Case> {
    let text = std::fs::read_to_string(Path::new(CORPUS).join("MANIFEST")).unwrap();
    text.lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
        .map(|l| {
            let f: Vec<&str> = l.split('\t').collect();
            assert_eq!(f.len(), 5, "MANIFEST line {l:?}");
            Case { file: f[0].into(), place: f[1].into(), command: f[2].into(), expect: f[3].into() }
        })
        .collect()
}

/// Every file under `dir` with its bytes (symbolic links by their target).
fn snapshot(dir: &Path) -> BTreeMap<PathBuf, Vec<u8>> {
    let mut out = BTreeMap::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for entry in std::fs::read_dir(&d).unwrap() {
            let path = entry.unwrap().path();
            let meta = std::fs::symlink_metadata(&path).unwrap();
            if meta.file_type().is_symlink() {
                out.insert(path.clone(), std::fs::read_link(&path).unwrap().into_os_string().into_encoded_bytes());
            } else if meta.is_dir() {
                stack.push(path);
            } else {
                out.insert(path.clone(), std::fs::read(&path).unwrap());
            }
        }
    }
    out
}

/// The bytes of a `generated-*` file (or of a committed one), placed into `project`.
fn content(case: &Case, project: &Path, outside: &Path) -> Vec<u8> {
    let name = case.file.rsplit('/').next().unwrap();
    let demo_model = || std::fs::read(concat!(env!("CARGO_MANIFEST_DIR"), "/demo-lexicon/model.g2p")).unwrap();
    let project_toml = "lexicon = \"lexicon.csv\"\nphoneset = \"en-arpa\"\nqueue = \"queue.jsonl\"\njournal = \"journal.jsonl\"\n";
    match name {
        "generated-10mib-line.csv" => format!("word,pronunciation,status,source,score,note\n{}\n", ",".repeat(TEN_MIB)).into_bytes(),
        "generated-3000x3000.pls" => {
            let mut xml = String::from("<?xml version=\"1.0\"?>\n<lexicon version=\"1.0\" xmlns=\"http://www.w3.org/2005/01/pronunciation-lexicon\" alphabet=\"ipa\">\n<lexeme>");
            (0..3_000).for_each(|i| xml.push_str(&format!("<grapheme>w{i}</grapheme>")));
            (0..3_000).for_each(|_| xml.push_str("<phoneme>ki</phoneme>"));
            xml.push_str("</lexeme></lexicon>\n");
            xml.into_bytes()
        }
        "generated-symlink-out.toml" => {
            std::fs::write(outside.join("lexicon.csv"), "word,pronunciation,status,source,score,note\n").unwrap();
            #[cfg(unix)]
            std::os::unix::fs::symlink(outside, project.join("elsewhere")).unwrap();
            project_toml.replace("\"lexicon.csv\"", "\"elsewhere/lexicon.csv\"").into_bytes()
        }
        "generated-10mib-line.toml" | "generated-10mib-line.jsonl" => format!("# {}\n", "x".repeat(TEN_MIB)).into_bytes(),
        "generated-truncated.g2p" => {
            let model = demo_model();
            model[..model.len() / 2].to_vec()
        }
        "generated-bit-flipped.g2p" => {
            let mut model = demo_model();
            let middle = model.len() / 2;
            model[middle] ^= 0x10;
            model
        }
        "generated-invalid-pronunciation.jsonl" => {
            // A queue item and a well-formed decision (good CRC, next sequence number) whose
            // pronunciation holds a phone en-arpa does not have.
            let mut queue = orthoepy::queue::Queue::new();
            queue.add(orthoepy::queue::Item::new_word("Kelport"));
            queue.save_as(&project.join("queue.jsonl")).unwrap();
            let path = project.join("journal.jsonl");
            let (mut journal, _) = orthoepy::queue::Journal::open(&path).unwrap();
            journal
                .append(orthoepy::queue::Record::Decide(orthoepy::queue::Decision {
                    item: "new:kelport".into(),
                    word: "Kelport".into(),
                    note: String::new(),
                    action: orthoepy::queue::Action::Accept { pronunciation: "K EH1 L P QQ1 T".into(), source: "g2p".into(), score: None, edited: false },
                }))
                .unwrap();
            std::fs::read(&path).unwrap()
        }
        _ => std::fs::read(Path::new(CORPUS).join(&case.file)).unwrap(),
    }
}

#[test]
fn every_hostile_file_is_refused_with_its_place_and_changes_nothing() {
    let cases = manifest();
    assert!(cases.len() >= 60, "{} files", cases.len());
    let mut failures = Vec::new();
    for case in &cases {
        let dir = tempfile::tempdir().unwrap();
        let project = dir.path().join("p");
        let outside = dir.path().join("outside");
        std::fs::create_dir_all(&project).unwrap();
        std::fs::create_dir_all(&outside).unwrap();
        write_project(&project, "quay,K IY1,imported,cmudict,,\n");
        std::fs::write(project.join("ok.dict"), "quay K IY1\n").unwrap();
        if case.place == "rules.toml" {
            let toml = std::fs::read_to_string(project.join("orthoepy.toml")).unwrap();
            std::fs::write(project.join("orthoepy.toml"), format!("{toml}letter_to_sound = \"rules.toml\"\n")).unwrap();
        }
        let bytes = content(case, &project, &outside);
        std::fs::write(project.join(&case.place), bytes).unwrap();
        let before = snapshot(&project);
        let args: Vec<String> = case.command.split(' ').map(|a| a.replace("{}", &case.place)).collect();
        let output = bin().current_dir(&project).env_remove("RUST_BACKTRACE").args(&args).output().unwrap();
        let stderr = String::from_utf8_lossy(&output.stderr).into_owned();
        let stdout = String::from_utf8_lossy(&output.stdout).into_owned();
        let mut problems = Vec::new();
        if stderr.contains("panicked") {
            problems.push("panicked".to_string());
        }
        match case.expect.strip_prefix("accept:") {
            Some(text) => {
                if output.status.code() != Some(0) || !(stdout.contains(text) || stderr.contains(text)) {
                    problems.push(format!("expected success with {text:?}"));
                }
            }
            None => {
                if output.status.code() != Some(2) {
                    problems.push(format!("exit {:?}, expected 2", output.status.code()));
                }
                for part in case.expect.split('|').filter(|p| !p.is_empty()) {
                    if !stderr.contains(part) {
                        problems.push(format!("stderr lacks {part:?}"));
                    }
                }
                let after = snapshot(&project);
                if after != before {
                    let changed: Vec<_> = after.keys().chain(before.keys()).filter(|k| after.get(*k) != before.get(*k)).collect();
                    problems.push(format!("files changed: {changed:?}"));
                }
            }
        }
        if !problems.is_empty() {
            let shown: String = stderr.chars().take(400).collect();
            failures.push(format!("{} ({}): {}\n    stderr: {shown}", case.file, case.command, problems.join("; ")));
        }
    }
    assert!(failures.is_empty(), "{} of {} files failed:\n{}", failures.len(), cases.len(), failures.join("\n"));
}

/// The language configuration has no command that reads a user's file (the workspace uses the
/// shipped ones), so its hostile files are read through the library reader.
#[test]
fn hostile_language_configurations_are_refused_with_their_place() {
    let set = orthoepy::phoneset::Phoneset::shipped("en-arpa").unwrap();
    let dir = tempfile::tempdir().unwrap();
    let cases: [(&str, &[u8], &str); 3] = [
        ("not-toml.toml", b"letter_to_sound = \n", "not-toml.toml:1:"),
        ("bad-utf8.toml", b"letter_to_sound = \"e\xffn\"\n", "bad-utf8.toml:1:"),
        ("huge.toml", &[b'#'; 2 << 20], "1 MiB"),
    ];
    for (name, bytes, expect) in cases {
        let path = dir.path().join(name);
        std::fs::write(&path, bytes).unwrap();
        let err = orthoepy::g2p::hybrid::LanguageConfig::load(&path, &set).unwrap_err().to_string();
        assert!(err.contains(expect), "{name}: {err}");
    }
}
