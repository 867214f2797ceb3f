//! Study plans: which benchmarks to map on which libraries with which goals.
//!
//! A plan is a JSON file (docs/study.md) naming benchmarks (file globs
//! relative to the plan's folder, or generator specifications), libraries
//! (built-in names or files), goals and mapping options. [`Plan::load`]
//! parses it, reporting syntax and type errors at their line and column, and
//! [`Plan::jobs`] expands it into one [`Job`] per benchmark × library × goal.
//! Each job has a stable [`plan_key`]: a 64-bit FNV-1a hash of a canonical
//! text of its benchmark, library, goal and options, identical across runs,
//! machines and crate builds, so results files can be resumed and merged and
//! shards ([`Shard`]) agree on who runs what.

use crate::diag::SourceError;
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// Mapping goal of a study job.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum Goal {
    /// Smallest area.
    Area,
    /// Smallest delay.
    Delay,
    /// Delay first, then area recovery.
    Balanced,
}

impl Goal {
    /// The goal's name as written in plans and reports.
    pub fn as_str(self) -> &'static str {
        match self {
            Goal::Area => "area",
            Goal::Delay => "delay",
            Goal::Balanced => "balanced",
        }
    }
}

/// How a mapped circuit is checked against its source.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum VerifyMode {
    /// A proof with the equivalence checker.
    Full,
    /// Random simulation.
    Sim,
    /// No check.
    None,
}

/// Cut sizes the mapper accepts (`cut_size`, `--cut-size`).
pub const CUT_SIZES: std::ops::RangeInclusive<u32> = 2..=6;
/// Priority cuts per node the mapper accepts (`cuts_per_node`).
pub const CUTS_PER_NODE: std::ops::RangeInclusive<u32> = 1..=64;
/// Energy-simulation pattern counts accepted (`patterns`, `--patterns`):
/// at least one transition, at most 2^24 patterns (a quarter of a second
/// per thousand cells, and 2 MB of input words per input).
pub const PATTERNS: std::ops::RangeInclusive<u64> = 2..=16_777_216;

/// Mapping and evaluation options of a plan (all optional).
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct PlanOptions {
    /// Cut size of the mapper.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cut_size: Option<u32>,
    /// Priority cuts kept per node.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub cuts_per_node: Option<u32>,
    /// How each mapping is checked (default `sim` until... see the study
    /// module docs; `full` proves).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub verify: Option<VerifyMode>,
    /// Probability of a one on each input in the energy simulation.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub input_probability: Option<f64>,
    /// Patterns simulated for energy.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub patterns: Option<u64>,
    /// Noise margin in millivolts every net must keep: margin-aware mapping
    /// as `map --min-margin` (characterised libraries only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub min_margin: Option<f64>,
}

/// One entry of the plan's `benchmarks` list.
#[derive(Clone, Debug, PartialEq)]
pub enum BenchmarkEntry {
    /// A file path or glob pattern, relative to the plan's folder.
    Files(String),
    /// A generated circuit: family and parameters.
    Generate {
        /// Generator family (e.g. `adder`).
        family: String,
        /// Other parameters (`width`, `style`, ...), in key order.
        params: std::collections::BTreeMap<String, serde_json::Value>,
    },
}

impl<'de> Deserialize<'de> for BenchmarkEntry {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        struct Visitor;
        impl<'de> serde::de::Visitor<'de> for Visitor {
            type Value = BenchmarkEntry;
            fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
                f.write_str(
                    "a file path or glob, or an object like {\"generate\": \"adder\", \"width\": 32}",
                )
            }
            fn visit_str<E: serde::de::Error>(self, v: &str) -> Result<BenchmarkEntry, E> {
                if v.is_empty() {
                    return Err(E::custom("empty benchmark path"));
                }
                Ok(BenchmarkEntry::Files(v.to_string()))
            }
            fn visit_map<A: serde::de::MapAccess<'de>>(
                self,
                mut map: A,
            ) -> Result<BenchmarkEntry, A::Error> {
                let mut family = None;
                let mut params = std::collections::BTreeMap::new();
                while let Some(key) = map.next_key::<String>()? {
                    if key == "generate" {
                        family = Some(map.next_value::<String>()?);
                    } else {
                        let value: serde_json::Value = map.next_value()?;
                        if !(value.is_number() || value.is_string() || value.is_boolean()) {
                            return Err(serde::de::Error::custom(format!(
                                "generator parameter '{key}' must be a number, string or boolean"
                            )));
                        }
                        if params.insert(key.clone(), value).is_some() {
                            return Err(serde::de::Error::custom(format!(
                                "duplicate generator parameter '{key}'"
                            )));
                        }
                    }
                }
                let family = family.ok_or_else(|| {
                    serde::de::Error::custom("a generated benchmark needs a \"generate\" field")
                })?;
                Ok(BenchmarkEntry::Generate { family, params })
            }
        }
        d.deserialize_any(Visitor)
    }
}

fn default_goals() -> Vec<Goal> {
    vec![Goal::Area]
}

/// The plan file as written.
#[derive(Clone, Debug, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
struct PlanFile {
    benchmarks: Vec<BenchmarkEntry>,
    libraries: Vec<String>,
    #[serde(default = "default_goals")]
    goals: Vec<Goal>,
    #[serde(default)]
    options: PlanOptions,
}

/// A benchmark after glob expansion.
#[derive(Clone, Debug, PartialEq)]
pub enum BenchmarkSource {
    /// A netlist file (absolute or relative to the current directory).
    File(PathBuf),
    /// A generated circuit.
    Generate {
        /// Family.
        family: String,
        /// Parameters in key order.
        params: std::collections::BTreeMap<String, serde_json::Value>,
    },
}

/// A benchmark of a plan: where it comes from, its name in tables and its
/// canonical specification (part of the plan key).
#[derive(Clone, Debug, PartialEq)]
pub struct PlanBenchmark {
    /// Name shown in tables (file stem or generator label).
    pub name: String,
    /// Canonical text: the path relative to the plan's folder with `/`
    /// separators, or `generate:FAMILY,key=value,...`.
    pub spec: String,
    /// Where to get the netlist.
    pub source: BenchmarkSource,
    /// Line and column (1-based) of the entry in the plan file, for
    /// messages about the benchmark (0, 0 when not found).
    pub position: (u32, u32),
}

/// A library of a plan.
#[derive(Clone, Debug, PartialEq)]
pub struct PlanLibrary {
    /// The specification as written in the plan (part of the plan key).
    pub spec: String,
    /// What to load: a built-in name, or a file resolved against the plan's
    /// folder when such a file exists.
    pub load: String,
    /// Line and column (1-based) of the specification in the plan file, for
    /// messages about the library (0, 0 when not found).
    pub position: (u32, u32),
}

/// A parsed, expanded study plan.
#[derive(Clone, Debug, PartialEq)]
pub struct Plan {
    /// The plan file.
    pub path: PathBuf,
    /// Benchmarks after glob expansion, duplicates removed, in plan order.
    pub benchmarks: Vec<PlanBenchmark>,
    /// Libraries in plan order.
    pub libraries: Vec<PlanLibrary>,
    /// Goals in plan order.
    pub goals: Vec<Goal>,
    /// Options for every job.
    pub options: PlanOptions,
}

/// One benchmark × library × goal of a plan.
#[derive(Clone, Debug, PartialEq)]
pub struct Job {
    /// Stable key (16 hex digits).
    pub plan_key: String,
    /// Index into [`Plan::benchmarks`].
    pub benchmark: usize,
    /// Index into [`Plan::libraries`].
    pub library: usize,
    /// Goal.
    pub goal: Goal,
}

/// 64-bit FNV-1a hash (offset basis 0xcbf29ce484222325, prime
/// 0x100000001b3, as published by Fowler, Noll and Vo).
pub fn fnv1a64(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for &b in bytes {
        h ^= u64::from(b);
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// The stable key of a job: FNV-1a over a canonical text of its parts,
/// written as 16 lowercase hex digits.
pub fn plan_key(
    benchmark_spec: &str,
    library_spec: &str,
    goal: Goal,
    options: &PlanOptions,
) -> String {
    let options = serde_json::to_string(options).unwrap_or_default();
    let canonical = format!(
        "ribbonmap-plan-key/1\nbenchmark={benchmark_spec}\nlibrary={library_spec}\ngoal={}\noptions={options}\n",
        goal.as_str()
    );
    format!("{:016x}", fnv1a64(canonical.as_bytes()))
}

/// A share of a study: shard `index` (1-based) of `count`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Shard {
    /// 1-based shard number.
    pub index: u32,
    /// Number of shards.
    pub count: u32,
}

impl std::str::FromStr for Shard {
    type Err = String;
    /// Parses `I/N` with 1 ≤ I ≤ N.
    fn from_str(s: &str) -> Result<Shard, String> {
        let bad = || format!("bad shard '{s}': expected I/N with 1 <= I <= N, e.g. 2/8");
        let (i, n) = s.split_once('/').ok_or_else(bad)?;
        let index: u32 = i.trim().parse().map_err(|_| bad())?;
        let count: u32 = n.trim().parse().map_err(|_| bad())?;
        if index == 0 || count == 0 || index > count {
            return Err(bad());
        }
        Ok(Shard { index, count })
    }
}

/// Line and column (1-based) of the first occurrence of `needle` in `text`.
fn locate(text: &str, needle: &str) -> (u32, u32) {
    match text.find(needle) {
        Some(offset) => {
            let before = &text[..offset];
            let line = before.matches('\n').count() as u32 + 1;
            let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) as u32 + 1;
            (line, column)
        }
        None => (0, 0),
    }
}

/// A serde_json error as a located diagnostic (its message without the
/// trailing " at line L column C").
pub fn json_error(file: &str, e: &serde_json::Error) -> SourceError {
    let text = e.to_string();
    let message = match text.rfind(" at line ") {
        Some(i) => text[..i].to_string(),
        None => text,
    };
    SourceError::new(
        file,
        (e.line() as u32).max(1),
        (e.column() as u32).max(1),
        message,
    )
}

fn generator_label(
    family: &str,
    params: &std::collections::BTreeMap<String, serde_json::Value>,
) -> String {
    let mut label = family.to_string();
    if let Some(w) = params.get("width") {
        label.push_str(&w.to_string());
    }
    for (k, v) in params {
        if k == "width" {
            continue;
        }
        let v = match v {
            serde_json::Value::String(s) => s.clone(),
            other => other.to_string(),
        };
        label.push('-');
        if k != "style" {
            label.push_str(k);
            label.push('=');
        }
        label.push_str(&v);
    }
    label
}

impl Plan {
    /// Reads and expands the plan at `path`.
    pub fn load(path: &Path) -> Result<Plan, SourceError> {
        let file = path.display().to_string();
        let bytes = std::fs::read(path)
            .map_err(|e| SourceError::new(&file, 0, 0, format!("cannot read plan: {e}")))?;
        let text = crate::diag::utf8_text(&file, bytes)?;
        Plan::parse(&text, path)
    }

    /// Parses plan `text` as if read from `path` (globs and library files
    /// are resolved against `path`'s folder).
    pub fn parse(text: &str, path: &Path) -> Result<Plan, SourceError> {
        let file = path.display().to_string();
        if text.trim().is_empty() {
            return Err(SourceError::new(
                &file,
                1,
                1,
                "the plan file is empty: expected a JSON object with \"benchmarks\" and \"libraries\" (docs/study.md)",
            ));
        }
        let raw: PlanFile = serde_json::from_str(text).map_err(|e| json_error(&file, &e))?;
        let here = |needle: &str, message: String| {
            let (line, column) = locate(text, needle);
            SourceError::new(&file, line, column, message)
        };
        let base = match path.parent() {
            Some(p) if !p.as_os_str().is_empty() => p.to_path_buf(),
            _ => PathBuf::from("."),
        };
        if raw.benchmarks.is_empty() {
            return Err(here(
                "\"benchmarks\"",
                "the plan lists no benchmarks".into(),
            ));
        }
        if raw.libraries.is_empty() {
            return Err(here("\"libraries\"", "the plan lists no libraries".into()));
        }
        if raw.goals.is_empty() {
            return Err(here("\"goals\"", "the plan lists no goals".into()));
        }
        if let Some(k) = raw.options.cut_size {
            if !CUT_SIZES.contains(&k) {
                return Err(here(
                    "\"cut_size\"",
                    format!("cut_size {k} is outside the allowed range 2 to 6"),
                ));
            }
        }
        if let Some(c) = raw.options.cuts_per_node {
            if !CUTS_PER_NODE.contains(&c) {
                return Err(here(
                    "\"cuts_per_node\"",
                    format!("cuts_per_node {c} is outside the allowed range 1 to 64"),
                ));
            }
        }
        if let Some(n) = raw.options.patterns {
            if !PATTERNS.contains(&n) {
                return Err(here(
                    "\"patterns\"",
                    format!(
                        "patterns {n} is outside the allowed range {} to {}",
                        PATTERNS.start(),
                        PATTERNS.end()
                    ),
                ));
            }
        }
        if let Some(p) = raw.options.input_probability {
            if !(0.0..=1.0).contains(&p) {
                return Err(here(
                    "\"input_probability\"",
                    format!("input_probability {p} is not between 0 and 1"),
                ));
            }
        }
        if let Some(mv) = raw.options.min_margin {
            if !mv.is_finite() || mv < 0.0 {
                return Err(here(
                    "\"min_margin\"",
                    format!("min_margin {mv} must be a non-negative number of millivolts"),
                ));
            }
        }
        let mut benchmarks: Vec<PlanBenchmark> = Vec::new();
        let mut push = |b: PlanBenchmark| {
            if !benchmarks.iter().any(|x| x.spec == b.spec) {
                benchmarks.push(b);
            }
        };
        for entry in &raw.benchmarks {
            match entry {
                BenchmarkEntry::Files(pattern) => {
                    let quoted = serde_json::to_string(pattern).unwrap_or_default();
                    let full = base.join(pattern);
                    let full_text = full.to_string_lossy().to_string();
                    let paths = glob::glob(&full_text).map_err(|e| {
                        here(&quoted, format!("bad glob pattern '{pattern}': {}", e.msg))
                    })?;
                    let mut found = Vec::new();
                    for p in paths {
                        let p = p.map_err(|e| here(&quoted, format!("cannot read {e}")))?;
                        if p.is_file() {
                            found.push(p);
                        }
                    }
                    if found.is_empty() {
                        return Err(here(
                            &quoted,
                            if Path::new(pattern).is_absolute() {
                                format!("'{pattern}' matches no file")
                            } else {
                                format!(
                                    "'{pattern}' matches no file (relative to {})",
                                    base.display()
                                )
                            },
                        ));
                    }
                    found.sort();
                    for p in found {
                        // A relative path is written with '/' whatever the
                        // platform, so plan keys agree across machines; an
                        // absolute one as found (joining its root component
                        // with '/' would double the leading slash).
                        let spec = match p.strip_prefix(&base) {
                            Ok(rel) if !Path::new(pattern).is_absolute() => rel
                                .components()
                                .map(|c| c.as_os_str().to_string_lossy().to_string())
                                .collect::<Vec<_>>()
                                .join("/"),
                            _ => p.to_string_lossy().to_string(),
                        };
                        let name = p
                            .file_stem()
                            .map(|s| s.to_string_lossy().to_string())
                            .unwrap_or_else(|| spec.clone());
                        push(PlanBenchmark {
                            name,
                            spec,
                            source: BenchmarkSource::File(p),
                            position: locate(text, &quoted),
                        });
                    }
                }
                BenchmarkEntry::Generate { family, params } => {
                    let mut spec = format!("generate:{family}");
                    for (k, v) in params {
                        spec.push_str(&format!(",{k}={v}"));
                    }
                    let quoted = serde_json::to_string(family).unwrap_or_default();
                    push(PlanBenchmark {
                        name: generator_label(family, params),
                        position: locate(text, &quoted),
                        spec,
                        source: BenchmarkSource::Generate {
                            family: family.clone(),
                            params: params.clone(),
                        },
                    });
                }
            }
        }
        let mut libraries: Vec<PlanLibrary> = Vec::new();
        for spec in &raw.libraries {
            if libraries.iter().any(|l| l.spec == *spec) {
                continue;
            }
            let candidate = base.join(spec);
            let load = if candidate.is_file() {
                candidate.to_string_lossy().to_string()
            } else {
                spec.clone()
            };
            let quoted = serde_json::to_string(spec).unwrap_or_default();
            libraries.push(PlanLibrary {
                spec: spec.clone(),
                load,
                position: locate(text, &quoted),
            });
        }
        let mut goals = Vec::new();
        for g in raw.goals {
            if !goals.contains(&g) {
                goals.push(g);
            }
        }
        Ok(Plan {
            path: path.to_path_buf(),
            benchmarks,
            libraries,
            goals,
            options: raw.options,
        })
    }

    /// Every job, sorted by plan key (ties, which would need a hash
    /// collision, by position), so the order is the same everywhere.
    pub fn jobs(&self) -> Vec<Job> {
        let mut jobs = Vec::new();
        for (bi, b) in self.benchmarks.iter().enumerate() {
            for (li, l) in self.libraries.iter().enumerate() {
                for &goal in &self.goals {
                    jobs.push(Job {
                        plan_key: plan_key(&b.spec, &l.spec, goal, &self.options),
                        benchmark: bi,
                        library: li,
                        goal,
                    });
                }
            }
        }
        jobs.sort_by(|a, b| a.plan_key.cmp(&b.plan_key));
        jobs
    }

    /// The jobs of one shard: job number j (0-based, in [`Plan::jobs`]
    /// order) belongs to shard `j % count + 1`.
    pub fn shard_jobs(&self, shard: Option<Shard>) -> Vec<Job> {
        let jobs = self.jobs();
        match shard {
            None => jobs,
            Some(s) => jobs
                .into_iter()
                .enumerate()
                .filter(|(j, _)| (*j as u32 % s.count) + 1 == s.index)
                .map(|(_, job)| job)
                .collect(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn fnv1a_reference_values() {
        // Published FNV-1a 64-bit test vectors (Fowler/Noll/Vo test suite,
        // from memory): "" and "a".
        assert_eq!(fnv1a64(b""), 0xcbf29ce484222325);
        assert_eq!(fnv1a64(b"a"), 0xaf63dc4c8601ec8c);
        assert_eq!(fnv1a64(b"foobar"), 0x85944171f73967e8);
    }

    #[test]
    fn keys_are_stable_and_distinct() {
        let o = PlanOptions {
            cut_size: Some(4),
            ..Default::default()
        };
        let k1 = plan_key("a.blif", "ribbon3", Goal::Area, &o);
        // Independently: FNV-1a 64 written out here from its published
        // definition (offset basis 0xcbf29ce484222325, prime 0x100000001b3;
        // Fowler, Noll and Vo) over the key text docs/study.md describes.
        let text = format!(
            "ribbonmap-plan-key/1\nbenchmark=a.blif\nlibrary=ribbon3\ngoal=area\noptions={}\n",
            serde_json::to_string(&o).unwrap()
        );
        let mut hash: u64 = 0xcbf29ce484222325;
        for &byte in text.as_bytes() {
            hash = (hash ^ u64::from(byte)).wrapping_mul(0x100000001b3);
        }
        assert_eq!(k1, format!("{hash:016x}"));
        assert_ne!(k1, plan_key("a.blif", "ribbon3", Goal::Delay, &o));
        assert_ne!(k1, plan_key("a.blif", "ribbon2", Goal::Area, &o));
        assert_eq!(k1.len(), 16);
    }

    #[test]
    fn syntax_errors_are_located() {
        let text = "{\n  \"benchmarks\": [\"x.blif\"],\n  \"libraries\": [\"ribbon3\"\n}";
        let e = Plan::parse(text, Path::new("dir/plan.json")).unwrap_err();
        assert_eq!(e.file, "dir/plan.json");
        assert_eq!(e.line, 4);
        let text = "{\"benchmarks\": [\"x.blif\"], \"libraries\": [\"r\"], \"goals\": [\"speed\"]}";
        let e = Plan::parse(text, Path::new("p.json")).unwrap_err();
        assert!(e.message.contains("unknown variant"), "{e}");
        assert_eq!(e.line, 1);
    }

    #[test]
    fn globs_are_relative_to_the_plan() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::create_dir(dir.path().join("b")).unwrap();
        for n in ["x.blif", "y.blif", "z.v"] {
            std::fs::write(dir.path().join("b").join(n), "").unwrap();
        }
        let plan_path = dir.path().join("plan.json");
        let text = r#"{"benchmarks": ["b/*.blif", {"generate": "adder", "width": 8, "style": "ripple"}],
                       "libraries": ["ribbon3", "ribbon2"], "goals": ["area", "delay"]}"#;
        let plan = Plan::parse(text, &plan_path).unwrap();
        let specs: Vec<&str> = plan.benchmarks.iter().map(|b| b.spec.as_str()).collect();
        assert_eq!(
            specs,
            [
                "b/x.blif",
                "b/y.blif",
                "generate:adder,style=\"ripple\",width=8"
            ]
        );
        assert_eq!(plan.benchmarks[2].name, "adder8-ripple");
        assert_eq!(plan.jobs().len(), 3 * 2 * 2);
        let missing = r#"{"benchmarks": ["nothing/*.blif"], "libraries": ["r"]}"#;
        let e = Plan::parse(missing, &plan_path).unwrap_err();
        assert_eq!((e.line, e.column), (1, 17));
    }

    #[test]
    fn shards_partition_the_jobs() {
        let dir = tempfile::tempdir().unwrap();
        let text = r#"{"benchmarks": [{"generate": "adder", "width": 4}, {"generate": "parity", "width": 5}],
                       "libraries": ["a", "b", "c"], "goals": ["area", "delay"]}"#;
        let plan = Plan::parse(text, &dir.path().join("p.json")).unwrap();
        let all: Vec<String> = plan.jobs().into_iter().map(|j| j.plan_key).collect();
        let mut union: Vec<String> = Vec::new();
        for i in 1..=3 {
            let shard = Shard { index: i, count: 3 };
            union.extend(plan.shard_jobs(Some(shard)).into_iter().map(|j| j.plan_key));
        }
        union.sort();
        assert_eq!(union, all);
        assert!("0/3".parse::<Shard>().is_err());
        assert!("4/3".parse::<Shard>().is_err());
        assert_eq!("2/3".parse::<Shard>(), Ok(Shard { index: 2, count: 3 }));
    }
}
