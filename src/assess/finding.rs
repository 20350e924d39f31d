//! Findings and the verdict: one finding per hazard assessed, each with the governing value,
//! its limit, its status and the action that clears it; the verdict sums them up.

use serde::Serialize;

use crate::caution::{render_parts, si_display, Caution, Level, Part};
use crate::units::{Display, Value};

/// A hazard a finding assesses. The kebab-case name is its fixed id in JSON.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Hazard {
    /// The pressure against the MAWP or the service pressure.
    PressureRating,
    /// The distance to keep people back against what the site can keep clear.
    BlastZone,
    /// The energy left in the vessel before it is opened.
    StoredEnergy,
    /// The coldest wall (or gas) against the MDMT.
    ColdMetal,
    /// The peak gas temperature of a fill against the cylinder's rating.
    FillTemperature,
    /// The pressure to stop a fill at so that it settles at the service pressure.
    FillTo,
    /// The depressuring check: the time a vent takes to a safe pressure.
    VentTime,
    /// Liquid or solid formed in the expansion: frost and liquid in the vent path.
    TwoPhase,
    /// The vent jet: noise and the reaction force on the vent line.
    VentJet,
    /// The released gas displaces oxygen.
    OxygenDepletion,
    /// The released gas enriches the air with oxygen and intensifies fire.
    OxygenEnrichment,
    /// The released gas burns.
    Flammable,
    /// The released gas is toxic (and displaces oxygen).
    Toxic,
    /// Pieces thrown if the vessel bursts.
    Fragments,
}

impl Hazard {
    /// Every hazard, in the order of the enum.
    pub const ALL: [Hazard; 14] = [
        Hazard::PressureRating,
        Hazard::BlastZone,
        Hazard::StoredEnergy,
        Hazard::ColdMetal,
        Hazard::FillTemperature,
        Hazard::FillTo,
        Hazard::VentTime,
        Hazard::TwoPhase,
        Hazard::VentJet,
        Hazard::OxygenDepletion,
        Hazard::OxygenEnrichment,
        Hazard::Flammable,
        Hazard::Toxic,
        Hazard::Fragments,
    ];

    /// The fixed id, as in JSON.
    pub fn id(self) -> &'static str {
        match self {
            Hazard::PressureRating => "pressure-rating",
            Hazard::BlastZone => "blast-zone",
            Hazard::StoredEnergy => "stored-energy",
            Hazard::ColdMetal => "cold-metal",
            Hazard::FillTemperature => "fill-temperature",
            Hazard::FillTo => "fill-to",
            Hazard::VentTime => "vent-time",
            Hazard::TwoPhase => "two-phase",
            Hazard::VentJet => "vent-jet",
            Hazard::OxygenDepletion => "oxygen-depletion",
            Hazard::OxygenEnrichment => "oxygen-enrichment",
            Hazard::Flammable => "flammable",
            Hazard::Toxic => "toxic",
            Hazard::Fragments => "fragments",
        }
    }

    /// A short name for a table.
    pub fn title(self) -> &'static str {
        match self {
            Hazard::PressureRating => "Pressure rating",
            Hazard::BlastZone => "Keep-back distance",
            Hazard::StoredEnergy => "Energy before opening",
            Hazard::ColdMetal => "Cold metal",
            Hazard::FillTemperature => "Fill temperature",
            Hazard::FillTo => "Fill-to pressure",
            Hazard::VentTime => "Vent time",
            Hazard::TwoPhase => "Liquid or frost",
            Hazard::VentJet => "Vent jet",
            Hazard::OxygenDepletion => "Oxygen depletion",
            Hazard::OxygenEnrichment => "Oxygen enrichment",
            Hazard::Flammable => "Flammable gas",
            Hazard::Toxic => "Toxic gas",
            Hazard::Fragments => "Fragments",
        }
    }
}

/// What a finding means for the work.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Status {
    /// Within its limit: nothing to do.
    Ok,
    /// The work can go ahead once the action is done.
    Action,
    /// Do not go ahead as planned.
    Stop,
}

impl Status {
    /// The status as printed.
    pub fn word(self) -> &'static str {
        match self {
            Status::Ok => "ok",
            Status::Action => "action",
            Status::Stop => "STOP",
        }
    }
}

/// One hazard assessed: the governing value against its limit, its status, and the action.
#[derive(Debug, Clone, PartialEq)]
pub struct Finding {
    /// The hazard.
    pub hazard: Hazard,
    /// What it means for the work.
    pub status: Status,
    /// The signal word of its banner, shown while the status is not ok.
    pub level: Level,
    /// The governing value, typed.
    pub value: Option<Value>,
    /// The limit it is held against, typed.
    pub limit: Option<Value>,
    /// Which model or rule governs ("wall model", "isentropic bound", "site clearance").
    pub basis: String,
    /// What was found, one sentence.
    pub result: Vec<Part>,
    /// One imperative sentence; empty when the status is ok.
    pub action: Vec<Part>,
}

impl Finding {
    /// A finding within its limit.
    pub fn ok(hazard: Hazard, basis: impl Into<String>, result: Vec<Part>) -> Finding {
        Finding {
            hazard,
            status: Status::Ok,
            level: Level::Notice,
            value: None,
            limit: None,
            basis: basis.into(),
            result,
            action: Vec::new(),
        }
    }

    /// A finding that needs `action` (status `action`) with a banner at `level`.
    pub fn action(
        hazard: Hazard,
        level: Level,
        basis: impl Into<String>,
        result: Vec<Part>,
        action: Vec<Part>,
    ) -> Finding {
        Finding {
            status: Status::Action,
            level,
            action,
            ..Finding::ok(hazard, basis, result)
        }
    }

    /// A finding that stops the work as planned, with a banner at `level`.
    pub fn stop(
        hazard: Hazard,
        level: Level,
        basis: impl Into<String>,
        result: Vec<Part>,
        action: Vec<Part>,
    ) -> Finding {
        Finding {
            status: Status::Stop,
            ..Finding::action(hazard, level, basis, result, action)
        }
    }

    /// The governing value and its limit.
    pub fn against(mut self, value: Value, limit: Option<Value>) -> Finding {
        self.value = Some(value);
        self.limit = limit;
        self
    }

    /// The banner this finding shows: its result and action under its signal word, or
    /// nothing while it is ok.
    pub fn banner(&self) -> Option<Caution> {
        (self.status != Status::Ok).then(|| {
            let mut parts = self.result.clone();
            if !self.action.is_empty() {
                parts.push(Part::from(" "));
                parts.extend(self.action.iter().cloned());
            }
            Caution::from_parts(self.level, parts)
        })
    }

    /// One line for a list: the hazard, its value against its limit, and the basis, e.g.
    /// `Cold metal: 14 °C, limit -29 °C [wall model]`.
    pub fn headline(&self, display: &Display) -> String {
        let mut head = self.hazard.title().to_string();
        if let Some(value) = &self.value {
            let shown = display.short(value);
            head.push_str(&format!(": {shown}"));
            if let Some(limit) = &self.limit {
                let limit_shown = display.short(limit);
                // Rounded alike ("130 °F, limit 130 °F"), the two would read as equal: say
                // which side of the limit the value lies.
                let side = match (value.si(), limit.si()) {
                    (Some((v, _)), Some((l, _))) if shown == limit_shown && v > l => {
                        "just above the limit of "
                    }
                    (Some((v, _)), Some((l, _))) if shown == limit_shown && v < l => {
                        "just below the limit of "
                    }
                    _ => "limit ",
                };
                head.push_str(&format!(", {side}{limit_shown}"));
            }
        }
        format!("{head} [{}]", self.basis)
    }

    /// The result in `display`'s units.
    pub fn result_text(&self, display: &Display) -> String {
        render_parts(&self.result, display)
    }

    /// The action in `display`'s units.
    pub fn action_text(&self, display: &Display) -> String {
        render_parts(&self.action, display)
    }
}

/// A number in SI with its unit's name, as JSON carries a finding's value and limit.
#[derive(Serialize)]
struct Si {
    value: f64,
    unit: &'static str,
}

fn si(v: &Option<Value>) -> Option<Si> {
    v.as_ref()
        .and_then(|v| v.si())
        .map(|(value, unit)| Si { value, unit })
}

impl Serialize for Finding {
    fn serialize<S: serde::Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let d = si_display();
        let mut st = s.serialize_struct("Finding", 8)?;
        st.serialize_field("hazard", &self.hazard)?;
        st.serialize_field("status", &self.status)?;
        // The signal word of its banner; none while it is ok.
        st.serialize_field("level", &(self.status != Status::Ok).then_some(self.level))?;
        st.serialize_field("value", &si(&self.value))?;
        st.serialize_field("limit", &si(&self.limit))?;
        st.serialize_field("basis", &self.basis)?;
        st.serialize_field("result", &self.result_text(&d))?;
        st.serialize_field("action", &self.action_text(&d))?;
        st.end()
    }
}

/// The decision a verdict gives.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum Decision {
    /// Every finding is ok.
    #[default]
    Go,
    /// Go once the actions are done; they are the conditions.
    GoWithActions,
    /// Some finding stops the work as planned.
    NoGo,
}

impl Decision {
    /// The decision as printed.
    pub fn word(self) -> &'static str {
        match self {
            Decision::Go => "GO",
            Decision::GoWithActions => "GO WITH ACTIONS",
            Decision::NoGo => "NO-GO",
        }
    }
}

/// The decision and the findings behind it.
#[derive(Debug, Clone, PartialEq, Serialize, Default)]
pub struct Verdict {
    /// `go`, `go-with-actions` or `no-go`.
    pub decision: Decision,
    /// One finding per hazard, stops first, then actions, then the ones that are ok.
    pub findings: Vec<Finding>,
}

impl Verdict {
    /// The verdict on `findings`: one per hazard (the worst where a hazard was assessed
    /// twice), ordered by status, then by signal word.
    pub fn new(findings: Vec<Finding>) -> Verdict {
        let mut kept: Vec<Finding> = Vec::new();
        for f in findings {
            match kept.iter_mut().find(|k| k.hazard == f.hazard) {
                Some(k) if (f.status, f.level) > (k.status, k.level) => *k = f,
                Some(_) => {}
                None => kept.push(f),
            }
        }
        // A stable sort keeps the calculations' order within a status and signal word.
        kept.sort_by_key(|f| std::cmp::Reverse((f.status, f.level)));
        let decision = match kept.iter().map(|f| f.status).max() {
            Some(Status::Stop) => Decision::NoGo,
            Some(Status::Action) => Decision::GoWithActions,
            _ => Decision::Go,
        };
        Verdict {
            decision,
            findings: kept,
        }
    }

    /// This verdict and `other`'s findings together.
    pub fn merged(self, other: Verdict) -> Verdict {
        Verdict::new(self.findings.into_iter().chain(other.findings).collect())
    }

    /// The worst status of any finding.
    pub fn worst(&self) -> Status {
        self.findings
            .iter()
            .map(|f| f.status)
            .max()
            .unwrap_or(Status::Ok)
    }

    /// The banners of the findings that are not ok, one per hazard.
    pub fn banners(&self) -> Vec<Caution> {
        self.findings.iter().filter_map(Finding::banner).collect()
    }

    /// The finding on `hazard`, if assessed.
    pub fn finding(&self, hazard: Hazard) -> Option<&Finding> {
        self.findings.iter().find(|f| f.hazard == hazard)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn f(hazard: Hazard, status: Status) -> Finding {
        Finding {
            status,
            ..Finding::ok(hazard, "test", vec![Part::from("x")])
        }
    }

    #[test]
    fn one_finding_per_hazard_the_worst_kept_stops_first() {
        let v = Verdict::new(vec![
            f(Hazard::TwoPhase, Status::Action),
            f(Hazard::ColdMetal, Status::Ok),
            f(Hazard::TwoPhase, Status::Ok),
            f(Hazard::BlastZone, Status::Stop),
        ]);
        let got: Vec<_> = v.findings.iter().map(|f| (f.hazard, f.status)).collect();
        assert_eq!(
            got,
            [
                (Hazard::BlastZone, Status::Stop),
                (Hazard::TwoPhase, Status::Action),
                (Hazard::ColdMetal, Status::Ok)
            ]
        );
        assert_eq!(v.decision, Decision::NoGo);
        assert_eq!(v.banners().len(), 2);
    }

    #[test]
    fn every_hazard_id_is_its_json_name() {
        for h in Hazard::ALL {
            assert_eq!(serde_json::to_value(h).unwrap(), h.id());
        }
    }

    #[test]
    fn a_value_rounded_like_its_limit_says_which_side_it_lies() {
        use uom::si::f64::ThermodynamicTemperature;
        use uom::si::thermodynamic_temperature::kelvin;
        let temperature = |k: f64| Value::Temperature(ThermodynamicTemperature::new::<kelvin>(k));
        let finding = |value: f64| Finding {
            value: Some(temperature(value)),
            limit: Some(temperature(327.594)),
            ..f(Hazard::FillTemperature, Status::Stop)
        };
        let d = si_display();
        // 54.444 °C rated; 0.0016 K over shows as the same 54 °C.
        assert!(finding(327.5956)
            .headline(&d)
            .contains(": 54 °C, just above the limit of 54 °C"));
        assert!(finding(327.59)
            .headline(&d)
            .contains(": 54 °C, just below the limit of 54 °C"));
        assert!(finding(330.0).headline(&d).contains(": 57 °C, limit 54 °C"));
    }

    #[test]
    fn no_findings_is_go() {
        assert_eq!(Verdict::new(Vec::new()).decision, Decision::Go);
    }
}
