//! Notes: the defaults and choices of a run that change its answer, collected as the run goes.
//!
//! A road without a damage value, a site without an id or a priority, a hub picked among equals, a
//! field report that matched no road: each silently shapes the plan unless it is said. Every note
//! goes to stderr (unless `--quiet`), to `summary.json` `notes` and to the report.

use crate::decimal::shown;
use crate::export::summary::Note;
use crate::ingest::ReadStats;
use crate::ingest::RoadSettings;
use crate::ingest::attach::Attachment;
use crate::ingest::damage::DamageRule;
use crate::ingest::reports::ReportFigures;
use crate::ingest::sites::{SITE_ID_FIELDS, SiteLayer, SiteSettings};

/// The notes of one run, in the order they arose.
#[derive(Debug, Default)]
pub struct Notes(Vec<Note>);

impl Notes {
    /// Adds a note.
    pub fn push(&mut self, code: &'static str, message: String) {
        self.0.push(Note { code, message });
    }

    /// The notes collected.
    pub fn into_vec(self) -> Vec<Note> {
        self.0
    }
}

/// Ids for a message as every list is ([`crate::ingest::limits::listed`]: the first 20, then how
/// many more), each cut when long ([`crate::ingest::limits::excerpt`]).
pub(super) fn list<'a>(ids: impl IntoIterator<Item = &'a str>) -> String {
    use crate::ingest::limits::{LISTED, excerpt, listed};
    // `listed` counts the rest: empty placeholders cost nothing to hold.
    let items: Vec<String> = ids
        .into_iter()
        .enumerate()
        .map(|(n, id)| {
            if n < LISTED {
                excerpt(id)
            } else {
                String::new()
            }
        })
        .collect();
    listed(&items)
}

/// "1 road" / "3 roads".
fn count(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// The verb for a count: `has` for one, `have` for more (likewise `lies` / `lie`).
fn verb(n: usize, one: &'static str, many: &'static str) -> &'static str {
    if n == 1 { one } else { many }
}

/// "no site has an id" when none has, else "2 of 5 sites have no id".
fn sites_without(n: usize, total: usize, a_thing: &str, thing: &str) -> String {
    if n == total {
        format!("no site has {a_thing}")
    } else {
        format!(
            "{} of {total} {} no {thing}",
            count(n, "site", "sites"),
            verb(n, "has", "have")
        )
    }
}

/// A damage factor in words.
fn factor_words(f: f64) -> String {
    if f < 0.0 {
        "impassable".into()
    } else if f == 0.0 {
        "factor 0 (intact)".into()
    } else if f == 1.0 {
        "factor 1 (full reconstruction)".into()
    } else {
        format!("factor {}", shown(f))
    }
}

/// Roads whose damage came from the default.
pub(super) fn damage(notes: &mut Notes, read: &ReadStats, s: &RoadSettings, later_damage: bool) {
    let n = read.damage_defaulted;
    if n == 0 {
        return;
    }
    let field = match &s.category_field {
        Some(c) => format!("category field `{c}`"),
        None => format!("damage field `{}`", s.damage.field),
    };
    let after = if later_damage {
        " before damage zones and field reports were applied"
    } else {
        ""
    };
    let f = factor_words(s.damage.default);
    if n == read.features_used {
        notes.push(
            "no_damage_values",
            format!(
                "no road has a value in the {field}: every road is counted at the default \
                 damage, {f}{after}; name the right field or set --default-damage"
            ),
        );
    } else {
        notes.push(
            "damage_defaulted",
            format!(
                "{} of {} {} no value in the {field} and {} counted at the default damage, \
                 {f}{after}",
                count(n, "road", "roads"),
                read.features_used,
                verb(n, "has", "have"),
                verb(n, "is", "are")
            ),
        );
    }
}

/// Sites that took a generated id or priority 1.
pub(super) fn site_defaults(notes: &mut Notes, sl: &SiteLayer, s: &SiteSettings) {
    let d = sl.defaults;
    let total = sl.sites.len();
    if d.generated_ids > 0 {
        let fields = match &s.id_field {
            Some(f) => format!("`{f}`"),
            None => format!("the GeoJSON id or any of {}", SITE_ID_FIELDS.join(", ")),
        };
        let who = sites_without(d.generated_ids, total, "an id", "id");
        notes.push(
            "site_ids_generated",
            format!("{who} in {fields}: such sites are named site-N by their position in the file"),
        );
    }
    if d.default_priority > 0 {
        let field = s.priority_field.as_deref().unwrap_or("priority");
        let who = sites_without(d.default_priority, total, "a value", "value");
        notes.push(
            "site_priority_default",
            format!("{who} in the priority field `{field}`: such sites count with priority 1"),
        );
    }
}

/// Damage zones or field reports without a damage value (`what` names them), counted at the
/// default of `rule`.
pub(super) fn layer_defaults(
    notes: &mut Notes,
    code: &'static str,
    what: (&str, &str),
    n: usize,
    total: usize,
    rule: &DamageRule,
) {
    if n == 0 {
        return;
    }
    notes.push(
        code,
        format!(
            "{} of {total} {} no value in the damage field `{}` and {} counted at the default \
             damage, {}",
            count(n, what.0, what.1),
            verb(n, "has", "have"),
            rule.field,
            verb(n, "is", "are"),
            factor_words(rule.default)
        ),
    );
}

/// Damage zones that changed no road's cost.
pub(super) fn zones_unused(notes: &mut Notes, zones: usize, edges_changed: usize) {
    if zones > 0 && edges_changed == 0 {
        notes.push(
            "damage_zones_changed_nothing",
            format!(
                "{} changed the cost of no road: check that the zones lie over the roads (and \
                 --zones-crs)",
                match zones {
                    1 => "the damage zone".to_string(),
                    n => format!("none of the {n} damage zones"),
                }
            ),
        );
    }
}

/// Field reports that matched no road.
pub(super) fn reports(notes: &mut Notes, fig: &ReportFigures, distance_m: f64) {
    if fig.unmatched.is_empty() {
        return;
    }
    notes.push(
        "damage_reports_unmatched",
        format!(
            "{} of {} {} farther than {} m (--point-match-distance) from every road and changed \
             nothing (summary.json damage_reports.unmatched lists them)",
            count(fig.unmatched.len(), "damage report", "damage reports"),
            fig.read,
            verb(fig.unmatched.len(), "lies", "lie"),
            shown(distance_m),
        ),
    );
}

/// Sites too far from every usable road to take part.
pub(super) fn unattached(
    notes: &mut Notes,
    sl: &SiteLayer,
    attachments: &[Attachment],
    max_attach_m: f64,
) {
    let far: Vec<&str> = sl
        .sites
        .iter()
        .zip(attachments)
        .filter(|(_, a)| a.junction.is_none())
        .map(|(s, _)| s.id.as_str())
        .collect();
    if far.is_empty() {
        return;
    }
    notes.push(
        "sites_not_attached",
        format!(
            "{} no usable road within --max-attach {} m and take no part in the plan: {}",
            if far.len() == 1 {
                "1 site has".to_string()
            } else {
                format!("{} sites have", far.len())
            },
            shown(max_attach_m),
            list(far)
        ),
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_stop_at_twenty_and_long_ids_are_cut() {
        let ids: Vec<String> = (1..=22).map(|i| format!("s{i}")).collect();
        let s = list(ids.iter().map(String::as_str));
        assert!(
            s.starts_with("s1, s2,") && s.ends_with("s20 and 2 more"),
            "{s}"
        );
        assert_eq!(list(["a"]), "a");
        let long = "x".repeat(1 << 20);
        assert!(list([long.as_str()]).len() < 100);
        assert_eq!(factor_words(1e300), "factor 1e300");
    }

    #[test]
    fn all_roads_without_damage_is_its_own_note() {
        let mut n = Notes::default();
        let read = ReadStats {
            features_used: 3,
            damage_defaulted: 3,
            ..Default::default()
        };
        damage(&mut n, &read, &RoadSettings::default(), false);
        let v = n.into_vec();
        assert_eq!(v[0].code, "no_damage_values");
        assert!(
            v[0].message.contains("full reconstruction"),
            "{}",
            v[0].message
        );
        let mut n = Notes::default();
        let read = ReadStats {
            features_used: 3,
            damage_defaulted: 1,
            ..Default::default()
        };
        damage(&mut n, &read, &RoadSettings::default(), false);
        assert!(
            n.into_vec()[0]
                .message
                .starts_with("1 road of 3 has no value")
        );
    }
}
