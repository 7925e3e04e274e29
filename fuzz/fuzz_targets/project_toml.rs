//! `orthoepy.toml` (`Project::parse`) on arbitrary text: it never panics, and every path it
//! resolves is either absolute as written or inside the project folder's path.
#![no_main]

use std::path::Path;

use libfuzzer_sys::fuzz_target;
use orthoepy::project::Project;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let root = Path::new("/fuzz/project");
    let Ok(project) = Project::parse(text, root, &root.join("orthoepy.toml")) else { return };
    assert_eq!(project.root, root);
    for p in [Some(&project.lexicon), project.model.as_ref(), Some(&project.queue), Some(&project.journal)].into_iter().flatten() {
        assert!(p.is_absolute(), "{} is not resolved", p.display());
    }
    let _ = project.headword_policy();
});
