//! What is worth saying about detections read whole, beside the reader's warnings: boxes far
//! apart in time (`gaps`), and class names that differ only in capitals.

use super::Detections;

impl Detections {
    /// Everything to say about these detections, one sentence each, for the command line and
    /// the page alike.
    pub fn notes(&self) -> Vec<String> {
        self.far_apart()
            .into_iter()
            .chain(self.classes_alike())
            .collect()
    }

    /// A note when class names differ only in capitals ("Pedestrian", "pedestrian"): they are
    /// counted as classes apart, which a detector or a spreadsheet mixing them did not mean.
    pub fn classes_alike(&self) -> Option<String> {
        let mut groups: Vec<Vec<&str>> = Vec::new();
        for name in &self.classes {
            match groups
                .iter_mut()
                .find(|g| g[0].to_lowercase() == name.to_lowercase())
            {
                Some(g) => g.push(name),
                None => groups.push(vec![name]),
            }
        }
        let alike: Vec<String> = groups
            .iter()
            .filter(|g| g.len() > 1)
            .map(|g| {
                let quoted: Vec<String> = g.iter().map(|n| format!("{n:?}")).collect();
                quoted.join(" and ")
            })
            .collect();
        (!alike.is_empty()).then(|| {
            format!(
                "the classes {} differ only in capitals, and are counted apart; if each is one \
                 class, write it one way in the file",
                alike.join("; ")
            )
        })
    }
}
