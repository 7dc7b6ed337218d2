//! `check --junit FILE`: the result of `check` as a JUnit XML report, the
//! format CI servers read and show as a test report.
//!
//! One `<testsuite>` per design file, named by the file; one `<testcase>`
//! per check, named by the check's id (`vceo`, `min_swing`,
//! `resistor_power.rc`, and with a tolerance analysis
//! `worst_case.min_swing` and `monte_carlo.yield`), with the file as its
//! class name. A failing check carries a `<failure>` whose message is the
//! check's sentence; a file that cannot be read is one test case with an
//! `<error>` carrying the reader's message. The `<testsuites>` element sums
//! the counts. `cli/tests/junit.xsd` is the schema the tests validate it
//! against.

/// One test case: the check's id, whether it passed, and its sentence.
pub(crate) struct Case {
    pub(crate) id: String,
    pub(crate) pass: bool,
    pub(crate) message: String,
}

/// What `check` found for one file: its cases, or the reader's message.
pub(crate) enum Suite {
    Checked(Vec<Case>),
    Invalid(String),
}

/// `text` made safe inside an XML attribute or element: the five special
/// characters escaped, and characters XML 1.0 does not allow (most control
/// characters, which a file's text can bring into a message) replaced by
/// U+FFFD.
fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            '\t' | '\n' | '\r' => out.push(c),
            c if (c as u32) < 0x20 || c == '\u{FFFE}' || c == '\u{FFFF}' => out.push('\u{FFFD}'),
            c => out.push(c),
        }
    }
    out
}

/// The report of `files` (name, what was found) as JUnit XML.
pub(crate) fn report(files: &[(String, Suite)]) -> String {
    let mut suites = String::new();
    let (mut tests, mut failures, mut errors) = (0usize, 0usize, 0usize);
    for (file, suite) in files {
        let name = escape(file);
        match suite {
            Suite::Checked(cases) => {
                let failed = cases.iter().filter(|c| !c.pass).count();
                tests += cases.len();
                failures += failed;
                suites.push_str(&format!(
                    "  <testsuite name=\"{name}\" tests=\"{}\" failures=\"{failed}\" errors=\"0\" skipped=\"0\">\n",
                    cases.len()
                ));
                for c in cases {
                    let id = escape(&c.id);
                    if c.pass {
                        suites.push_str(&format!(
                            "    <testcase name=\"{id}\" classname=\"{name}\"/>\n"
                        ));
                    } else {
                        let m = escape(&c.message);
                        suites.push_str(&format!(
                            "    <testcase name=\"{id}\" classname=\"{name}\">\n      <failure message=\"{m}\" type=\"check\">{m}</failure>\n    </testcase>\n"
                        ));
                    }
                }
            }
            Suite::Invalid(message) => {
                tests += 1;
                errors += 1;
                let m = escape(message);
                suites.push_str(&format!(
                    "  <testsuite name=\"{name}\" tests=\"1\" failures=\"0\" errors=\"1\" skipped=\"0\">\n    <testcase name=\"read\" classname=\"{name}\">\n      <error message=\"{m}\" type=\"invalid\">{m}</error>\n    </testcase>\n"
                ));
            }
        }
        suites.push_str("  </testsuite>\n");
    }
    format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<testsuites name=\"stagewright check\" tests=\"{tests}\" failures=\"{failures}\" errors=\"{errors}\">\n{suites}</testsuites>\n"
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn special_and_control_characters_are_escaped() {
        assert_eq!(
            escape("a<b & \"c\" 'd' e>"),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos; e&gt;"
        );
        assert_eq!(escape("x\u{0}y\u{1b}z"), "x\u{FFFD}y\u{FFFD}z");
        assert_eq!(escape("line\nnext"), "line\nnext");
    }

    #[test]
    fn counts_add_up() {
        let files = vec![
            (
                "a.json".to_string(),
                Suite::Checked(vec![
                    Case {
                        id: "vceo".into(),
                        pass: true,
                        message: String::new(),
                    },
                    Case {
                        id: "min_swing".into(),
                        pass: false,
                        message: "short".into(),
                    },
                ]),
            ),
            ("b.json".to_string(), Suite::Invalid("unknown key".into())),
        ];
        let xml = report(&files);
        assert!(
            xml.contains(
                "<testsuites name=\"stagewright check\" tests=\"3\" failures=\"1\" errors=\"1\">"
            ),
            "{xml}"
        );
        assert!(xml.contains("<failure message=\"short\" type=\"check\">short</failure>"));
        assert!(xml.contains("<error message=\"unknown key\" type=\"invalid\">"));
    }
}
