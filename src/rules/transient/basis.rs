//! The transient's basis in words: where the inner coefficient came from, and the wall.

use super::*;

/// Where the inner coefficient came from, and the wall, in words for the basis.
pub(super) fn model_basis(basis: InnerBasis, exchange: &Exchange) -> Vec<Note> {
    if exchange.mode == HeatTransfer::None {
        return vec![Note::new(
            "heat transfer",
            "None: the gas exchanges no heat with the wall (the adiabatic bound).",
        )];
    }
    let inner = match basis {
        InnerBasis::Given => "a coefficient given by the user",
        InnerBasis::None => "no heat transfer",
        InnerBasis::JetCorrelation => "the inlet jet (through the inlet bore given) and natural convection, Nu = 0.56·Re_d^0.67 + 0.104·Ra^0.352 with the gas's own properties at each step (Woodfield, Monde & Takano 2008), capped at the 500 W/(m²·K) measured in fills so that it is not extrapolated to faster ones (a conservative choice, no source)",
        InnerBasis::JetCorrelationAssumedInlet => "the inlet jet and natural convection, Nu = 0.56·Re_d^0.67 + 0.104·Ra^0.352 with the gas's own properties at each step (Woodfield, Monde & Takano 2008), capped at the 500 W/(m²·K) measured in fills; no inlet bore was given, so the jet enters through 8 mm, the widest of the usual 2–8 mm valve bores and the one that cools least (common practice, no source); give --inlet-diameter for the real one",
        InnerBasis::NaturalConvection => "natural convection in the vessel, Nu = 0.104·Ra^0.352 (Woodfield, Monde & Takano 2008)",
    };
    let wall = &exchange.wall;
    let mut parts = vec![
        Part::from("Lumped gas and wall ("),
        Part::from(Value::Mass(wall.mass)),
        Part::from(format!(" of {}", wall.material.name())),
    ];
    if let Some(wrap) = wall.wrap {
        parts.push(Part::from(" liner, and a "));
        parts.push(Part::from(Value::Mass(wrap.mass)));
        parts.push(Part::from(format!(
            " carbon-fibre wrap conducting {} W/(m·K)",
            Material::Composite.conductivity()
        )));
    }
    if wall.material.insulating() || wall.wrap.is_some() {
        parts.push(Part::from(
            "; insulating layers are cut into slices through their thickness, the innermost a tenth of the depth heat reaches over the run",
        ));
    }
    parts.push(Part::from(format!(
        "); inside, {inner}; outside, 4.5 W/(m²·K) to still air. Integrated with an adaptive Dormand–Prince 5(4) scheme; results hold to 1e-6 when the tolerance is tightened."
    )));
    let mut out = vec![Note {
        topic: "heat transfer",
        parts,
    }];
    let edge = match basis {
        InnerBasis::JetCorrelation | InnerBasis::JetCorrelationAssumedInlet => Some(
            "The fill is run again with the correlation's coefficient 30 % lower, the scatter taken on it (convection correlations carry errors of up to about 25 %, Incropera & DeWitt, from memory; the fill correlation was fitted to hydrogen alone). The go/no-go and the highest safe rate are decided on that conservative edge; the central peak is shown beside it.",
        ),
        InnerBasis::NaturalConvection => Some(
            "The vent is run again with the correlation's coefficient 30 % lower and 30 % higher, the scatter taken on it (convection correlations carry errors of up to about 25 %, Incropera & DeWitt, from memory). The lowest gas and wall temperatures' conservative edges are the lowest of the three runs (less heat from the wall leaves the gas colder, more leaves the wall colder); the cold-metal finding is decided on the wall's edge.",
        ),
        InnerBasis::Given => Some(
            "The inner coefficient was given: it has no stated scatter, so the results' conservative edges are the central values.",
        ),
        InnerBasis::None => None,
    };
    out.extend(edge.map(|text| Note::new("conservative edge", text)));
    if wall.any_estimated() {
        out.push(Note::new(
            "wall mass",
            "The wall mass was not given and is estimated from the volume, pressure rating and material by a membrane-stress rule (common practice, no source). Give the real mass from the nameplate or data sheet for a better result.",
        ));
    }
    if let Some(w) = wall.wrap.filter(|w| w.split_from_empty) {
        out.push(crate::note!(
            "wall mass",
            "The cylinder's empty mass is split between liner (",
            Value::Mass(wall.mass),
            ") and wrap (",
            Value::Mass(w.mass),
            ") in the proportions of their estimates (common practice, no source). A valve counted in the empty mass makes the wall heavier than it is, which errs towards a cooler gas.",
        ));
    }
    if wall.wrap.is_some_and(|w| w.liner_assumed) {
        out.push(Note::new(
            "liner",
            "The composite cylinder's liner was not given and is taken as aluminium (assumed). A plastic-lined cylinder keeps more of the heat in the gas and runs hotter than this: give --liner plastic (liner = \"plastic\" in a site file) for one, and check the label or data sheet.",
        ));
    }
    out
}
