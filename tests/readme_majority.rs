//! The README's "What do majority gates buy?" section quotes its own
//! command's output.
//!
//! The test reads the section from README.md, runs the command of its `sh`
//! block, and checks that the section holds the command's output verbatim
//! (so every number of the table) and that every number of the prose is a
//! figure of that output; the prose's "2n cells" for the 16-bit ripple-carry
//! adder on ribbon3 is checked against integer arithmetic (2 × 16).
//! Because the expected numbers come from the README, the test survives a
//! change of the built-in libraries once the section is regenerated (run the
//! command, paste its output).

use std::path::Path;
use std::process::Command;

const HEADING: &str = "## What do majority gates buy?";

fn readme() -> String {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md");
    std::fs::read_to_string(path).expect("README.md")
}

/// The section's text, from its heading to the next second-level heading.
fn section(readme: &str) -> &str {
    assert_eq!(
        readme.matches(HEADING).count(),
        1,
        "the section appears exactly once"
    );
    let start = readme.find(HEADING).expect("heading");
    let rest = &readme[start + HEADING.len()..];
    let end = rest.find("\n## ").unwrap_or(rest.len());
    &rest[..end]
}

/// The arguments of the section's `cargo run --release -- …` command.
fn command_args(section: &str) -> Vec<String> {
    let start = section.find("```sh\n").expect("an sh block") + "```sh\n".len();
    let len = section[start..].find("```").expect("closed sh block");
    let joined = section[start..start + len].replace("\\\n", " ");
    let words: Vec<String> = joined.split_whitespace().map(str::to_string).collect();
    assert_eq!(
        words[..4],
        ["cargo", "run", "--release", "--"],
        "the command runs the tool"
    );
    words[4..].to_vec()
}

/// Number tokens of `text` that are not part of a name (no letter, digit
/// or underscore beside them), a trailing full stop removed.
fn numbers(text: &str) -> Vec<String> {
    let chars: Vec<char> = text.chars().collect();
    let mut out = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        if chars[i].is_ascii_digit() && (i == 0 || !is_word(chars[i - 1])) {
            let mut j = i;
            while j < chars.len() && (chars[j].is_ascii_digit() || chars[j] == '.') {
                j += 1;
            }
            let token: String = chars[i..j].iter().collect();
            if j == chars.len() || !is_word(chars[j]) {
                out.push(token.trim_end_matches('.').to_string());
            }
            i = j;
        } else {
            i += 1;
        }
    }
    out
}

fn is_word(c: char) -> bool {
    c.is_alphanumeric() || c == '_'
}

/// The section without its code blocks and table lines.
fn prose(section: &str) -> String {
    let mut out = String::new();
    let mut in_code = false;
    for line in section.lines() {
        if line.starts_with("```") {
            in_code = !in_code;
            continue;
        }
        if !in_code && !line.starts_with('|') {
            out.push_str(line);
            out.push('\n');
        }
    }
    out
}

/// The cells of the table row of `benchmark` (first row of its group) on
/// `library`, from the command's markdown output.
fn row<'a>(output: &'a str, benchmark: &str, library: &str) -> Vec<&'a str> {
    let mut current = "";
    for line in output.lines().filter(|l| l.starts_with('|')) {
        let cells: Vec<&str> = line.trim_matches('|').split('|').map(str::trim).collect();
        if !cells[0].is_empty() {
            current = cells[0];
        }
        if current == benchmark && cells.get(1) == Some(&library) {
            return cells;
        }
    }
    panic!("no row for {benchmark} on {library}");
}

#[test]
fn majority_section_quotes_its_commands_output() {
    let readme = readme();
    let section = section(&readme);
    let args = command_args(section);
    let cache = std::env::temp_dir().join(format!("ribbonmap-readme-{}", std::process::id()));
    let out = Command::new(assert_cmd::cargo::cargo_bin("ribbonmap"))
        .args(&args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .env("RIBBONMAP_CACHE_DIR", &cache)
        .output()
        .expect("runs");
    let _ = std::fs::remove_dir_all(&cache);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let output = String::from_utf8(out.stdout).expect("utf-8");
    let output = output.trim();
    // Every line of the output, every number of the table, in the section.
    assert!(
        section.contains(output),
        "the section's table is not the command's output; paste this:\n{output}"
    );
    // Every number of the prose is a figure of the output.
    let figures = numbers(output);
    let missing: Vec<String> = numbers(&prose(section))
        .into_iter()
        .filter(|n| !figures.contains(n))
        .collect();
    assert!(
        missing.is_empty(),
        "prose numbers not in the output: {missing:?}"
    );
    // "2n cells on ribbon3": 2 × 16 for the 16-bit adder (integer arithmetic).
    let cells = row(output, "adder16_ripple", "ribbon3")[2];
    assert!(cells.starts_with("32 "), "{cells}");
    assert!(section.contains("takes 2n cells on `ribbon3`"));
}

#[test]
fn numbers_skip_names_and_keep_decimals() {
    assert_eq!(
        numbers("maj3 and FO4, 32 cells, 2.75 times, 2n, adder16_ripple, (1.13)."),
        ["32", "2.75", "1.13"]
    );
}
