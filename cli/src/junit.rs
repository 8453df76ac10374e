//! JUnit XML for CI servers: one test case per expectation.

use crate::output::svg::escape;

pub struct Case {
    pub name: String,
    /// The failure message, None when the expectation holds.
    pub message: Option<String>,
}

pub struct Suite {
    pub name: String,
    pub cases: Vec<Case>,
}

pub fn report(suites: &[Suite]) -> String {
    let tests: usize = suites.iter().map(|s| s.cases.len()).sum();
    let failures: usize = suites.iter().map(|s| s.cases.iter().filter(|c| c.message.is_some()).count()).sum();
    let mut x = format!("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<testsuites name=\"lodestone check\" tests=\"{tests}\" failures=\"{failures}\">\n");
    for s in suites {
        let f = s.cases.iter().filter(|c| c.message.is_some()).count();
        x += &format!("  <testsuite name=\"{}\" tests=\"{}\" failures=\"{f}\">\n", escape(&s.name), s.cases.len());
        for c in &s.cases {
            match &c.message {
                None => x += &format!("    <testcase classname=\"{}\" name=\"{}\"/>\n", escape(&s.name), escape(&c.name)),
                Some(m) => {
                    x += &format!(
                        "    <testcase classname=\"{}\" name=\"{}\">\n      <failure message=\"{}\"/>\n    </testcase>\n",
                        escape(&s.name),
                        escape(&c.name),
                        escape(m)
                    );
                }
            }
        }
        x += "  </testsuite>\n";
    }
    x += "</testsuites>\n";
    x
}
