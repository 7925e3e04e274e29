//! Applying compiled rules to one pronunciation: finding the sites where a rule matches,
//! rewriting a chosen subset of them simultaneously, and expanding every combination of rule
//! applications into weighted outcomes, pruned by probability. Owns the matching engine; must
//! not know about lexicons, words or output formats (that is `generate`).

use std::collections::HashMap;

use crate::phoneset::{PhoneId, Phoneset};

use super::compile::{Action, Mode, Pattern, Rule, STRESS_NONE, STRESS_PRIMARY, STRESS_UNSTRESSED};

/// One phone of a pronunciation being rewritten.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Tok {
    pub phone: PhoneId,
    /// Stress code (see `compile::STRESS_*`).
    pub stress: u8,
    /// Index of the canonical phone this one stands for; an inserted phone takes the index of
    /// the canonical phone it precedes.
    pub origin: u16,
}

#[derive(Clone, Copy)]
enum Dir {
    Forward,
    Backward,
}

/// The phone after cursor `c` in direction `dir`, and the cursor beyond it.
#[inline]
fn step(toks: &[Tok], c: usize, dir: Dir) -> Option<(&Tok, usize)> {
    match dir {
        Dir::Forward => toks.get(c).map(|t| (t, c + 1)),
        Dir::Backward => c.checked_sub(1).and_then(|p| toks.get(p).map(|t| (t, p))),
    }
}

#[inline]
fn at_edge(toks: &[Tok], c: usize, dir: Dir) -> bool {
    match dir {
        Dir::Forward => c >= toks.len(),
        Dir::Backward => c == 0,
    }
}

/// Every cursor reachable by matching `p` once from `c`.
fn ends(p: &Pattern, toks: &[Tok], c: usize, dir: Dir, out: &mut Vec<usize>) {
    match p {
        Pattern::Boundary => {
            if at_edge(toks, c, dir) {
                out.push(c)
            }
        }
        Pattern::One(m) => {
            if let Some((t, next)) = step(toks, c, dir) {
                if m.matches(t.phone, t.stress) {
                    out.push(next)
                }
            }
        }
        Pattern::Choice(alts) => alts.iter().for_each(|a| ends(a, toks, c, dir, out)),
        Pattern::Optional(inner) => {
            out.push(c);
            ends(inner, toks, c, dir, out);
        }
        Pattern::Repeat(inner) => {
            let mut reached = vec![c];
            let mut frontier = vec![c];
            while let Some(from) = frontier.pop() {
                let mut next = Vec::new();
                ends(inner, toks, from, dir, &mut next);
                for n in next {
                    if !reached.contains(&n) {
                        reached.push(n);
                        frontier.push(n);
                    }
                }
            }
            out.extend(reached);
        }
    }
}

/// Whether the pattern sequence matches starting at cursor `c` (patterns in matching order).
fn matches_seq(pats: &[Pattern], toks: &[Tok], c: usize, dir: Dir) -> bool {
    let Some((first, rest)) = pats.split_first() else { return true };
    match first {
        Pattern::Boundary => at_edge(toks, c, dir) && matches_seq(rest, toks, c, dir),
        Pattern::One(m) => {
            step(toks, c, dir).is_some_and(|(t, next)| m.matches(t.phone, t.stress) && matches_seq(rest, toks, next, dir))
        }
        _ => {
            let mut out = Vec::new();
            ends(first, toks, c, dir, &mut out);
            out.into_iter().any(|e| matches_seq(rest, toks, e, dir))
        }
    }
}

/// Sites where `rule` applies: phone indices, or gap indices (0..=len) for insertions.
pub(crate) fn sites(rule: &Rule, toks: &[Tok]) -> Vec<usize> {
    let context = |before: usize, after: usize| {
        matches_seq(&rule.left, toks, before, Dir::Backward) && matches_seq(&rule.right, toks, after, Dir::Forward)
    };
    match &rule.target {
        None => (0..=toks.len()).filter(|&g| context(g, g)).collect(),
        Some(targets) => toks
            .iter()
            .enumerate()
            .filter(|(_, t)| targets.iter().any(|m| m.matches(t.phone, t.stress)))
            .filter(|(_, t)| match &rule.action {
                // A vowel with primary stress is never deleted: the variant would lose its stress.
                Action::Delete => t.stress != STRESS_PRIMARY,
                Action::Map(map) => map.get(usize::from(t.phone)).copied().flatten().is_some_and(|to| to != t.phone),
                Action::Insert(_) => false,
            })
            .filter(|(i, _)| context(*i, i + 1))
            .map(|(i, _)| i)
            .collect(),
    }
}

/// Stress a phone gets when it takes the place of one with `stress`: nuclei keep it (or become
/// unstressed), non-nuclei carry none.
fn carried_stress(set: &Phoneset, phone: PhoneId, stress: u8) -> u8 {
    match (set.phone(phone).is_nucleus(), stress) {
        (false, _) => STRESS_NONE,
        (true, STRESS_NONE) => STRESS_UNSTRESSED,
        (true, s) => s,
    }
}

/// Rewrites `toks` at the chosen sites (ascending) all at once.
pub(crate) fn rewrite(set: &Phoneset, rule: &Rule, toks: &[Tok], chosen: &[usize], end_origin: u16) -> Vec<Tok> {
    let mut out = Vec::with_capacity(toks.len() + chosen.len());
    let mut pick = chosen.iter().peekable();
    for g in 0..=toks.len() {
        let here = pick.peek().is_some_and(|&&s| s == g);
        if here {
            pick.next();
        }
        if let (true, Action::Insert(phone)) = (here, &rule.action) {
            let origin = toks.get(g).map_or(end_origin, |t| t.origin);
            out.push(Tok { phone: *phone, stress: carried_stress(set, *phone, STRESS_NONE), origin });
        }
        let Some(t) = toks.get(g) else { break };
        match (&rule.action, here) {
            (Action::Delete, true) => {}
            (Action::Map(map), true) => {
                let to = map.get(usize::from(t.phone)).copied().flatten().unwrap_or(t.phone);
                out.push(Tok { phone: to, stress: carried_stress(set, to, t.stress), origin: t.origin });
            }
            _ => out.push(*t),
        }
    }
    out
}

/// A rule as used by a profile: with the probability it applies and the rule set it came from.
pub(crate) struct Weighted<'a> {
    pub rule: &'a Rule,
    pub set_id: &'a str,
    pub weight: f64,
}

/// One outcome of expanding a pronunciation.
#[derive(Debug, Clone)]
pub(crate) struct Outcome {
    pub toks: Vec<Tok>,
    pub probability: f64,
    /// (index into the weighted rule list, canonical position).
    pub fired: Vec<(usize, u16)>,
}

/// Bounds for expansion.
pub(crate) struct Limits {
    pub min_probability: f64,
    pub beam: usize,
}

/// Every outcome of applying the rules in order to `canonical` (the canonical itself included
/// when it keeps any probability), identical strings merged with their probabilities summed.
pub(crate) fn expand(set: &Phoneset, rules: &[Weighted<'_>], canonical: Vec<Tok>, limits: &Limits) -> Vec<Outcome> {
    let end_origin = u16::try_from(canonical.len()).unwrap_or(u16::MAX);
    let mut states = vec![Outcome { toks: canonical, probability: 1.0, fired: Vec::new() }];
    for (index, w) in rules.iter().enumerate() {
        let weight = w.weight.clamp(0.0, 1.0);
        let mut next = Vec::with_capacity(states.len());
        for state in states {
            let found = sites(w.rule, &state.toks);
            if found.is_empty() {
                next.push(state);
                continue;
            }
            let mut emit = |chosen: &[usize], p: f64| {
                let toks = if chosen.is_empty() { state.toks.clone() } else { rewrite(set, w.rule, &state.toks, chosen, end_origin) };
                let mut fired = state.fired.clone();
                fired.extend(chosen.iter().map(|&s| {
                    (index, state.toks.get(s).map_or(end_origin, |t| t.origin))
                }));
                next.push(Outcome { toks, probability: p, fired });
            };
            let p = state.probability;
            match w.rule.mode {
                Mode::Obligatory => {
                    for (chosen, q) in [(&found[..], p * weight), (&[][..], p * (1.0 - weight))] {
                        if q > 0.0 && q >= limits.min_probability {
                            emit(chosen, q);
                        }
                    }
                }
                Mode::Optional => choose(&found, 0, &mut Vec::new(), p, weight, limits.min_probability, &mut emit),
            }
        }
        states = merge(next);
        if states.len() > limits.beam {
            states.sort_by(|a, b| b.probability.total_cmp(&a.probability));
            states.truncate(limits.beam);
        }
    }
    states
}

/// Depth-first choice of applying or skipping each site, pruning below `min`.
fn choose(sites: &[usize], k: usize, chosen: &mut Vec<usize>, p: f64, w: f64, min: f64, emit: &mut impl FnMut(&[usize], f64)) {
    let Some(&site) = sites.get(k) else {
        emit(chosen, p);
        return;
    };
    let (apply, skip) = (p * w, p * (1.0 - w));
    if apply > 0.0 && apply >= min {
        chosen.push(site);
        choose(sites, k + 1, chosen, apply, w, min, emit);
        chosen.pop();
    }
    if skip > 0.0 && skip >= min {
        choose(sites, k + 1, chosen, skip, w, min, emit);
    }
}

/// Merges outcomes with the same phones and stress, summing probabilities; the derivation of
/// the more probable one is kept.
fn merge(outcomes: Vec<Outcome>) -> Vec<Outcome> {
    let mut seen: HashMap<Vec<(PhoneId, u8)>, usize> = HashMap::with_capacity(outcomes.len());
    let mut out: Vec<Outcome> = Vec::with_capacity(outcomes.len());
    for o in outcomes {
        let key: Vec<(PhoneId, u8)> = o.toks.iter().map(|t| (t.phone, t.stress)).collect();
        match seen.get(&key).and_then(|&i| out.get_mut(i)) {
            Some(existing) => {
                if o.probability > existing.probability {
                    existing.fired = o.fired;
                    existing.toks = o.toks;
                }
                existing.probability += o.probability;
            }
            None => {
                seen.insert(key, out.len());
                out.push(o);
            }
        }
    }
    out
}
