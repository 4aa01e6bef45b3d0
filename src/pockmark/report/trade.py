"""Output of a shield trade study: the ranked table on the terminal, CSV and JSON files."""

from pockmark.io.results import write_json, write_table_csv
from pockmark.report.summary import CAUTIONS

#: Files ``pockmark trade`` writes into its output folder.
TRADE_FILES = ("upgrades.csv", "upgrades.json")

_COLUMNS = (
    ("name", "name"),
    ("tag", "tag"),
    ("component", "component"),
    ("origin", "origin"),
    ("equation", "equation"),
    ("tag_penetrations_before", "tag_penetrations_before"),
    ("tag_penetrations_after", "tag_penetrations_after"),
    ("penetrations_removed", "penetrations_removed"),
    ("mass_added_kg", "mass_added_kg"),
    ("removed_per_kg", "removed_per_kg"),
    ("pnp_alone", "pnp_alone"),
    ("meets_requirement_alone", "meets_requirement_alone"),
)


def write_trade(result, out_dir, manifest):
    """Write ``upgrades.csv`` (one row per candidate, best first) and ``upgrades.json``
    (everything, with the run's manifest and the cautions), each atomically."""
    columns = {header: [_cell(entry[key]) for entry in result["candidates"]]
               for header, key in _COLUMNS}
    write_table_csv(out_dir / "upgrades.csv", columns)
    write_json(out_dir / "upgrades.json", {**result, "manifest": manifest,
                                           "cautions": list(CAUTIONS)})


def _cell(value):
    if value is None:
        return ""
    if isinstance(value, bool):
        return int(value)
    return value


def _kg(value):
    return f"{value:+.1f}" if abs(value) >= 0.05 else "0"


def format_trade(result, limit=15):
    """The study as terminal text: verdict, where the risk is, the best candidates, the plan."""
    lines = []
    base = result["baseline"]
    required = result["requirement"]
    head = (f"Now: PNP {base['pnp']:.5f} "
            f"(N = {base['expected_penetrations']:.4g} critical penetrations)")
    if required is not None:
        verdict = "met" if base["pnp"] >= required else "NOT MET"
        head += f", requirement PNP >= {required:g}: {verdict}"
    lines += [head, ""]
    for component, need in result.get("component_requirements", {}).items():
        lines.append(f"  Component {component}: requirement PNP >= {need:g}")
    lines.append(f"  {'tag':<22}{'share':>8}{'N':>12}{'mass kg':>11}  equation")
    for tag in result["tags"]:
        share = "-" if tag["share"] is None else f"{tag['share']:.1%}"
        lines.append(f"  {tag['tag']:<22}{share:>8}{tag['expected_penetrations']:>12.4g}"
                     f"{tag['shield_mass_kg']:>11.1f}  {tag['equation']}")
    lines += ["", f"  Candidates, best first ({len(result['candidates'])} evaluated; N removed per "
                  "added kg, free gains first):"]
    width = max([len(e["name"]) for e in result["candidates"][:limit]] + [10]) + 2
    lines.append(f"  {'upgrade':<{width}}{'N removed':>11}{'+kg':>9}{'N/kg':>11}{'PNP alone':>11}")
    for entry in result["candidates"][:limit]:
        per_kg = "free" if entry["removed_per_kg"] is None and entry["penetrations_removed"] > 0 \
            else "-" if entry["removed_per_kg"] is None else f"{entry['removed_per_kg']:.3g}"
        mark = " *" if entry["meets_requirement_alone"] else ""
        lines.append(f"  {entry['name']:<{width}}{entry['penetrations_removed']:>11.4g}"
                     f"{_kg(entry['mass_added_kg']):>9}{per_kg:>11}{entry['pnp_alone']:>11.5f}{mark}")
    if any(e["meets_requirement_alone"] for e in result["candidates"][:limit]):
        lines.append("  * meets the requirement on its own")
    plan = result["plan"]
    lines += ["", "  Plan (greedy, most risk removed per added kg at each step):"]
    width = max([len(step["name"]) for step in plan["steps"]] + [10]) + 1
    for number, step in enumerate(plan["steps"], 1):
        mass = _kg(step["cumulative_mass_added_kg"])
        lines.append(f"  {number:>3}. {step['name']:<{width}} {mass:>9} kg  PNP {step['pnp']:.5f}")
    if not plan["steps"]:
        lines.append("       no candidate removes risk")
    for target in plan["targets"]:
        if target["required"] is not None:
            verdict = "met" if target["met"] else "NOT MET"
            lines.append(f"  After the plan, {target['target']}: PNP {target['pnp']:.5f} "
                         f"(required {target['required']:g}): {verdict}")
    if plan["met"] is not None:
        if plan["met"]:
            lines.append(f"  Requirements met after {len(plan['steps'])} step(s), "
                         f"{plan['mass_added_kg']:+.1f} kg.")
        else:
            lines.append(f"  The candidates cannot meet every requirement "
                         f"({plan['mass_added_kg']:+.1f} kg tried). Add stronger [[upgrades]] "
                         f"to the case.")
    for note in result["notes"]:
        lines.append(f"  Note: {note}")
    lines += ["", "  Caution: model estimates on the run's discretisation, not a certification; "
                  "masses count the build-ups' areal densities only."]
    return "\n".join(lines)
