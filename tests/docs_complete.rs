//! The repository documents itself: docs/README.md lists every page of
//! docs/, docs/testing.md names what every test file checks against, and no
//! text in the repository sends readers to a design document outside it.
//! The lists compared are the folder listings themselves.

use std::path::Path;

fn names(dir: &str, ext: &str) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().and_then(|e| e.to_str()) == Some(ext))
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

#[test]
fn every_docs_page_is_listed_in_the_docs_index() {
    let index = std::fs::read_to_string("docs/README.md").unwrap();
    for page in names("docs", "md") {
        if page != "README.md" {
            assert!(
                index.contains(&format!("({page})")),
                "docs/README.md does not list {page}"
            );
        }
    }
}

#[test]
fn every_test_file_names_what_it_checks_against() {
    let table = std::fs::read_to_string("docs/testing.md").unwrap();
    for file in names("tests", "rs") {
        let row = format!("| `{file}` | ");
        let line = table
            .lines()
            .find(|l| l.starts_with(&row))
            .unwrap_or_else(|| panic!("docs/testing.md has no line for tests/{file}"));
        assert!(line.len() > row.len() + 20, "{line}");
    }
}

#[test]
fn nothing_points_at_a_design_document_outside_the_repository() {
    let mut files = vec![
        "README.md".to_string(),
        "DEVELOPERS.md".to_string(),
        "libraries/README.md".to_string(),
    ];
    for dir in ["docs", "tests", "src/cli"] {
        for ext in ["md", "rs"] {
            files.extend(names(dir, ext).into_iter().map(|n| format!("{dir}/{n}")));
        }
    }
    for file in files {
        if !Path::new(&file).exists() || file == "tests/docs_complete.rs" {
            continue;
        }
        let text = std::fs::read_to_string(&file).unwrap();
        assert!(!text.contains("DESIGN.md"), "{file} cites DESIGN.md");
        assert!(!text.contains("shared/"), "{file} points at shared/");
    }
}
