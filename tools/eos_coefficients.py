#!/usr/bin/env python3
"""Writes data/equations_of_state.json: the coefficients of each gas's reference
multiparameter Helmholtz-energy equation of state, in pvhazard's own layout.

    pip install -r tools/requirements.txt
    python3 tools/eos_coefficients.py

The coefficients are read from CoolProp's fluid files (the version pinned in
tools/requirements.txt), and each gas's paper is cited beside it from the BibTeX library
CoolProp ships. pvhazard embeds the JSON at build time and evaluates the equations itself;
CoolProp only checks it (tools/real_gas_tables.py -> tests/reference/).

Layout of one fluid (all SI, molar basis as in the papers):
    alpha = alpha0(delta, tau) + alphar(delta, tau), delta = rho/rho_r, tau = T_r/T
    ideal.lead [a1, a2]          ln(delta) + a1 + a2*tau (the reference-state offset folded in)
    ideal.log_tau a              a*ln(tau)
    ideal.power {n, t}           sum n*tau^t
    ideal.planck_einstein {n, t} sum n*ln(1 - exp(-t*tau))
    ideal.planck_generalized {n, t, c, d}   sum n*ln(c + d*exp(t*tau))
    residual.power {n, d, t, l}  sum n*delta^d*tau^t*exp(-delta^l)   (no exponential when l = 0)
    residual.gaussian {n, d, t, eta, epsilon, beta, gamma}
                                 sum n*delta^d*tau^t*exp(-eta*(delta-epsilon)^2 - beta*(tau-gamma)^2)
    residual.non_analytic {n, a, b, beta, A, B, C, D}   (Span & Wagner 1996 form)
                                 sum n*Delta^b*delta*psi, Delta = theta^2 + B*((delta-1)^2)^a,
                                 theta = (1-tau) + A*((delta-1)^2)^(1/(2*beta)),
                                 psi = exp(-C*(delta-1)^2 - D*(tau-1)^2)
    ancillary.{p_sat, rho_liquid, rho_vapour}: starting guesses for the saturation solver only,
        x/x_r = exp((T_r/T if tau_r) * sum n*theta^t) ("exponential") or
        x/x_r = 1 + sum n*theta^t ("linear"), theta = 1 - T/T_r.
"""
import json
import os
import re

import CoolProp
import CoolProp.CoolProp as CP

PINNED = "8.0.0"
OUT = os.path.join(os.path.dirname(__file__), "..", "data", "equations_of_state.json")

# pvhazard's gas names -> CoolProp's fluid names, shared by the scripts.
from gases import GASES  # noqa: E402


def bibtex():
    """Entries of the BibTeX library shipped with CoolProp, by key."""
    path = os.path.join(os.path.dirname(CoolProp.__file__), "CoolPropBibTeXLibrary.bib")
    text = open(path, encoding="utf-8").read()
    entries = {}
    for m in re.finditer(r"@\w+\{([^,]+),(.*?)\n\}", text, re.S):
        fields = {}
        for f in re.finditer(r"(\w+)\s*=\s*\{(.*?)\},?\s*\n", m.group(2), re.S):
            fields[f.group(1).lower()] = re.sub(r"[{}]", "", " ".join(f.group(2).split()))
        entries[m.group(1).strip()] = fields
    return entries


def cite(entries, keys):
    out = []
    for key in keys.split(","):
        e = entries[key.strip()]
        where = ", ".join(x for x in (e.get("journal"), e.get("volume"), e.get("pages")) if x)
        year = e.get("year") or key.strip().rsplit("-", 1)[-1]
        where = where or "Unpublished, as CoolProp's bibliography lists it"
        out.append(f"{e['author']} ({year}). {e['title']}. {where}.")
    return " ".join(out)


def ideal_part(terms, t_reducing):
    lead = [0.0, 0.0]
    ideal = {"lead": lead, "log_tau": 0.0, "power": {"n": [], "t": []},
             "planck_einstein": {"n": [], "t": []},
             "planck_generalized": {"n": [], "t": [], "c": [], "d": []}}
    for term in terms:
        kind = term["type"]
        if kind in ("IdealGasHelmholtzLead", "IdealGasHelmholtzEnthalpyEntropyOffset"):
            lead[0] += term["a1"]
            lead[1] += term["a2"]
        elif kind == "IdealGasHelmholtzLogTau":
            ideal["log_tau"] += term["a"]
        elif kind == "IdealGasHelmholtzPower":
            ideal["power"]["n"] += term["n"]
            ideal["power"]["t"] += term["t"]
        elif kind == "IdealGasHelmholtzPlanckEinstein":
            ideal["planck_einstein"]["n"] += term["n"]
            ideal["planck_einstein"]["t"] += term["t"]
        elif kind == "IdealGasHelmholtzPlanckEinsteinFunctionT":
            # n*ln(1 - exp(-v/T)) = n*ln(1 - exp(-(v/T_r)*tau)); exact only when the term's
            # temperature is the reducing one, which holds for every gas here.
            assert term["Tcrit"] == t_reducing, (term["Tcrit"], t_reducing)
            ideal["planck_einstein"]["n"] += term["n"]
            ideal["planck_einstein"]["t"] += [v / t_reducing for v in term["v"]]
        elif kind == "IdealGasHelmholtzPlanckEinsteinGeneralized":
            for k in ("n", "t", "c", "d"):
                ideal["planck_generalized"][k] += term[k]
        else:
            raise SystemExit(f"unknown ideal-gas term {kind}")
    return ideal


def residual_part(terms):
    res = {"power": {k: [] for k in "ndtl"},
           "gaussian": {k: [] for k in ("n", "d", "t", "eta", "epsilon", "beta", "gamma")},
           "non_analytic": {k: [] for k in ("n", "a", "b", "beta", "A", "B", "C", "D")}}
    names = {"ResidualHelmholtzPower": "power", "ResidualHelmholtzGaussian": "gaussian",
             "ResidualHelmholtzNonAnalytic": "non_analytic"}
    for term in terms:
        part = names.get(term["type"])
        if part is None:
            raise SystemExit(f"unknown residual term {term['type']}")
        for k in res[part]:
            res[part][k] += [float(x) for x in term[k]]
    return res


def ancillary(a):
    kinds = {"pL": "exponential", "pV": "exponential", "rhoV": "exponential",
             "rhoLnoexp": "linear"}
    return {"kind": kinds[a["type"]], "n": a["n"], "t": a["t"], "t_r": a["T_r"],
            "reducing": a["reducing_value"], "tau_r": bool(a["using_tau_r"]),
            "t_min": a["Tmin"], "t_max": a["Tmax"]}


def main():
    assert CoolProp.__version__ == PINNED, f"CoolProp {CoolProp.__version__}, pinned {PINNED}"
    entries = bibtex()
    fluids = []
    for name, cp_name in GASES:
        j = json.loads(CP.get_fluid_param_string(cp_name, "JSON"))[0]
        eos = j["EOS"][0]
        st = CP.AbstractState("HEOS", cp_name)
        red = eos["STATES"]["reducing"]
        anc = j["ANCILLARIES"]
        fluids.append({
            "gas": name,
            "reference": cite(entries, eos["BibTeX_EOS"]),
            "pseudo_pure": bool(eos["pseudo_pure"]),
            "molar_mass": eos["molar_mass"],
            "gas_constant": eos["gas_constant"],
            "t_reducing": red["T"],
            "rho_reducing": red["rhomolar"],
            "t_critical": st.T_critical(),
            "p_critical": st.p_critical(),
            "rho_critical": st.rhomolar_critical(),
            "t_triple": st.Ttriple(),
            "t_max": eos["T_max"],
            "p_max": eos["p_max"],
            "ideal": ideal_part(eos["alpha0"], red["T"]),
            "residual": residual_part(eos["alphar"]),
            "ancillary": {
                "p_sat": ancillary(anc.get("pS") or anc["pV"]),
                "rho_liquid": ancillary(anc["rhoL"]),
                "rho_vapour": ancillary(anc["rhoV"]),
            },
        })
    doc = {
        "about": "Reference Helmholtz-energy equations of state, one per gas; written by "
                 "tools/eos_coefficients.py from CoolProp " + CoolProp.__version__ +
                 " fluid files. Do not edit by hand.",
        "fluids": fluids,
    }
    with open(OUT, "w", encoding="utf-8") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"wrote {os.path.normpath(OUT)}: {len(fluids)} fluids")


if __name__ == "__main__":
    main()
