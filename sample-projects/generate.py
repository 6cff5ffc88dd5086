#!/usr/bin/env python3
"""Regenerates the invented demo datasets of the sample projects.

Every scenario is made up; the numbers come from a seeded generator (Python's
standard library only), so running this again writes byte-identical files:

    python3 sample-projects/generate.py
"""
import csv
import hashlib
import json
import math
import os
import random

HERE = os.path.dirname(os.path.abspath(__file__))


def write(folder, name, header, rows):
    path = os.path.join(HERE, folder)
    os.makedirs(path, exist_ok=True)
    tmp = os.path.join(path, name + ".tmp")
    with open(tmp, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(header)
        w.writerows(rows)
    os.replace(tmp, os.path.join(path, name))


def coffee_discount(rng):
    """A coffee roaster's weekly spend per customer by discount depth (%) and
    loyalty membership; members respond less to deeper discounts, so the lines
    cross inside the observed range. Customers are nested in 36 shops."""
    rows = []
    shops = [rng.gauss(0, 1.5) for _ in range(36)]
    for i in range(900):
        shop = rng.randrange(36)
        member = 1 if rng.random() < 0.42 else 0
        discount = round(rng.uniform(0, 30), 1)
        tenure = round(rng.uniform(1, 60))
        spend = (14.0 + 0.55 * discount + 6.5 * member - 0.38 * discount * member
                 + 0.05 * tenure + shops[shop] + rng.gauss(0, 2.5 + 0.08 * discount))
        rows.append([f"{spend:.2f}", f"{discount:.1f}", member, tenure, f"shop{shop + 1:02d}"])
    write("coffee-discount", "spend.csv",
          ["weekly_spend", "discount_pct", "loyalty_member", "tenure_months", "shop"], rows)


def orchard_nitrogen(rng):
    """Apple orchard plots: yield (t/ha) by nitrogen dose (kg/ha) and soil
    moisture (%); nitrogen pays off more on moister soil."""
    rows = []
    for i in range(480):
        nitrogen = round(rng.uniform(0, 160), 0)
        moisture = round(rng.uniform(12, 38), 1)
        slope = round(rng.uniform(0, 12), 1)
        yld = (18 + 0.02 * nitrogen + 0.35 * moisture + 0.0021 * nitrogen * moisture
               - 0.15 * slope + rng.gauss(0, 2.2))
        rows.append([f"{yld:.2f}", f"{nitrogen:.0f}", f"{moisture:.1f}", f"{slope:.1f}"])
    write("orchard-nitrogen", "plots.csv", ["yield_t_ha", "nitrogen_kg_ha", "soil_moisture_pct", "slope_pct"], rows)


def volunteer_onboarding(rng):
    """Volunteer hours in the first quarter by onboarding format (in person /
    online) and whether a mentor was assigned: a 2 x 2 design."""
    rows = []
    for i in range(640):
        fmt = rng.choice(["in person", "online"])
        mentor = rng.choice(["mentor", "no mentor"])
        age = rng.randint(18, 74)
        base = 38 if fmt == "in person" else 29
        lift = 4 if fmt == "in person" else 11
        hours = base + (lift if mentor == "mentor" else 0) + 0.05 * (age - 40) + rng.gauss(0, 9)
        rows.append([f"{max(hours, 0):.1f}", fmt, mentor, age])
    write("volunteer-onboarding", "volunteers.csv", ["hours_q1", "onboarding", "mentoring", "age"], rows)


def helpdesk_staffing(rng):
    """Ticket resolution time (hours) by staffing level (agents on shift) and
    shift (day / evening / night): extra staff help most at night."""
    rows = []
    effect = {"day": -0.35, "evening": -0.6, "night": -1.1}
    base = {"day": 9.0, "evening": 11.0, "night": 16.0}
    for i in range(1200):
        shift = rng.choices(["day", "evening", "night"], weights=[5, 3, 2])[0]
        staff = rng.randint(3, 14)
        weekday = rng.choice(["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"])
        t = base[shift] + effect[shift] * staff + (1.5 if weekday in ("Sat", "Sun") else 0) + rng.gauss(0, 2.0)
        rows.append([f"{max(t, 0.2):.2f}", staff, shift, weekday])
    write("helpdesk-staffing", "tickets.csv", ["resolution_hours", "agents_on_shift", "shift", "weekday"], rows)


def trial_conversion(rng):
    """Whether a software trial converts to a paid plan (0/1) by number of
    guided-setup sessions and company size (log employees)."""
    rows = []
    for i in range(2000):
        sessions = rng.randint(0, 6)
        employees = int(math.exp(rng.uniform(math.log(3), math.log(2000))))
        size = math.log(employees)
        eta = -2.6 + 0.25 * sessions + 0.12 * size + 0.09 * sessions * size
        p = 1 / (1 + math.exp(-eta))
        rows.append([1 if rng.random() < p else 0, sessions, employees, rng.choice(["EU", "NA", "APAC"])])
    write("trial-conversion", "trials.csv", ["converted", "setup_sessions", "employees", "region"], rows)


def turbine_repairs(rng):
    """Wind-farm repair visits: hours to fix a fault by the lead technician's
    experience (years), at three kinds of site (onshore / coastal / offshore)
    and in the wind on the day (m/s). Experience saves most time offshore and
    in strong wind. Visits are done by 40 crews (shared crew habits: clustered
    errors); a few wind readings and experience records are missing ("NA")."""
    rows = []
    crews = [rng.gauss(0, 0.8) for _ in range(40)]
    base = {"onshore": 4.0, "coastal": 5.5, "offshore": 9.0}
    saving = {"onshore": -0.10, "coastal": -0.18, "offshore": -0.42}
    for i in range(1500):
        crew = rng.randrange(40)
        site = rng.choices(["onshore", "coastal", "offshore"], weights=[5, 3, 2])[0]
        experience = round(rng.uniform(0.5, 22), 1)
        wind = round(max(0.5, rng.gauss(8.5 if site == "offshore" else 6.5, 2.8)), 1)
        turbine_age = rng.randint(1, 19)
        hours = (base[site] + saving[site] * experience + 0.35 * wind - 0.03 * experience * wind
                 + 0.06 * turbine_age + crews[crew] + rng.gauss(0, 1.1 + 0.1 * wind))
        rows.append([f"{max(hours, 0.3):.2f}", "NA" if rng.random() < 0.008 else f"{experience:.1f}", site,
                     "NA" if rng.random() < 0.012 else f"{wind:.1f}", turbine_age, f"crew{crew + 1:02d}"])
    write("turbine-repairs", "visits.csv",
          ["repair_hours", "experience_years", "site", "wind_ms", "turbine_age", "crew"], rows)


def warehouse_picking(rng):
    """Order pickers' items per hour by their weeks on the job, in 60
    warehouses that differ in how many of their aisles are automated (%).
    Experience pays off less where more of the work is automated: a
    cross-level interaction. Warehouses differ in their level and in how
    fast their pickers learn (a random intercept and a random slope); they
    employ 4 to 40 pickers; a few shift records are missing ("NA")."""
    rows = []
    for w in range(60):
        automation = round(rng.uniform(0, 80), 0)
        level, learning = rng.gauss(0, 6.0), rng.gauss(0, 0.05)
        for _ in range(rng.randint(4, 40)):
            weeks = round(rng.uniform(1, 104), 0)
            night = 1 if rng.random() < 0.3 else 0
            items = (92 + 0.30 * automation + (0.42 + learning) * weeks - 0.0045 * weeks * automation
                     - 4.0 * night + level + rng.gauss(0, 9))
            rows.append([f"{items:.1f}", f"{weeks:.0f}", "NA" if rng.random() < 0.01 else ("night" if night else "day"),
                         f"{automation:.0f}", f"wh{w + 1:02d}"])
    rng.shuffle(rows)
    write("warehouse-picking", "pickers.csv",
          ["items_per_hour", "weeks_on_job", "shift", "automation_pct", "warehouse"], rows)


def poisson_draw(rng, mean):
    """A Poisson count by inversion (mean well below 700, so exp(-mean) keeps its digits)."""
    k, p = 0, math.exp(-mean)
    total, u = p, rng.random()
    while u > total and p > 0:
        k += 1
        p *= mean / k
        total += p
    return k


def desk_complaints(rng):
    """Customer complaints a week at a city's service desks by the staff's
    training hours that week and the average queue (minutes), with the desk's
    opening hours as the exposure (complaints scale with the hours a desk is
    open) and the kind of desk as a control. Training cuts complaints most
    where queues are long. Counts vary more than a Poisson model allows
    (a gamma-mixed Poisson: the negative binomial with alpha 0.35)."""
    rows = []
    alpha = 0.35
    for i in range(720):
        kind = rng.choice(["counter", "phone", "counter and phone"])
        training = round(rng.uniform(0, 30), 1)
        queue = round(rng.uniform(2, 28), 1)
        hours = rng.choice([20, 24, 30, 36, 40, 48, 56, 60])
        log_rate = (-2.9 + 0.010 * training + 0.060 * queue - 0.0022 * training * queue
                    + (0.25 if kind == "phone" else 0.1 if kind == "counter and phone" else 0.0))
        mean = hours * math.exp(log_rate) * rng.gammavariate(1 / alpha, alpha)
        rows.append([poisson_draw(rng, mean), f"{training:.1f}", f"{queue:.1f}", hours, kind])
    write("desk-complaints", "desks.csv",
          ["complaints", "training_hours", "queue_minutes", "open_hrs", "desk_kind"], rows)


def analysis(id_, name, dataset, outcome, focal, moderator, controls=(), family="linear", se="model-based",
             scale="model", pinned=(), clusters="", groups="", random_slopes=(), straight_line=False, exposure=""):
    out = {
        "id": id_, "name": name, "dataset": dataset,
        "roles": {"outcome": outcome, "focal": focal, "moderator": moderator, "second_moderator": "",
                  "controls": list(controls), "weights": "", "clusters": clusters},
        "family": family, "standard_errors": se, "level": 0.95, "centring": "none",
        "probe": {"current": None, "pinned": list(pinned), "second_value": None, "scale": scale,
                  "averaging": "sample", "simultaneous_band": False, "show_points": True},
        "figure": {"preset": "memo", "width_in": 6.5, "height_in": 4.0, "dpi": 300, "font_family": "DejaVu Sans",
                   "font_pt": 9, "greyscale": False, "caption": True},
    }
    if straight_line:  # the straight-line check on the Effect plot: binned estimates and the smooth curve
        out["probe"]["binned_estimates"] = True
        out["probe"]["smooth_curve"] = True
    if exposure:  # a count model's exposure, written only when set (as the program does)
        out["roles"]["exposure"] = exposure
    if groups:  # a multilevel model: the Groups role and its settings, as the program writes them
        out["roles"]["groups"] = groups
        out["multilevel"] = {"random_slopes": list(random_slopes), "estimation": "reml", "random_covariance": "full",
                             "df": "satterthwaite", "centre_within": [], "group_means": []}
    return out


def write_project(folder, data_name, dataset_id, analyses, missing=("", "NA", "NaN", "."), kept=("lines", "Lines plot")):
    """A ready project file (schema 2, docs/cli-output.md) beside the data: one dataset, its analyses, a kept
    figure each (`kept`: the plot key and its name; two categorical predictors have a Cells plot, not lines)."""
    path = os.path.join(HERE, folder)
    with open(os.path.join(path, data_name), "rb") as f:
        digest = hashlib.sha256(f.read()).hexdigest()
    doc = {
        "schema_version": 2,
        "program": "Moderato (sample-projects/generate.py)",
        "datasets": [{"id": dataset_id, "path": data_name, "sha256": digest,
                      "import": {"delimiter": ",", "header": True, "missing_tokens": list(missing),
                                 "decimal_comma": False, "column_kinds": {}}}],
        "derived_columns": [],
        "analyses": analyses,
        "figures": [{"id": "fig-" + a["id"], "name": a["name"] + ": " + kept[1], "analysis": a["id"], "plot": kept[0]}
                    for a in analyses],
    }
    tmp = os.path.join(path, folder + ".moderato.tmp")
    with open(tmp, "w") as f:
        f.write(json.dumps(doc, indent=2, ensure_ascii=False) + "\n")
    os.replace(tmp, os.path.join(path, folder + ".moderato"))


def write_projects():
    write_project("coffee-discount", "spend.csv", "spend", [
        analysis("discount-loyalty", "discount × loyalty", "spend", "weekly_spend", "discount_pct", "loyalty_member",
                 controls=["tenure_months"], se="hc3")])
    write_project("orchard-nitrogen", "plots.csv", "plots", [
        analysis("nitrogen-moisture", "nitrogen × soil moisture", "plots", "yield_t_ha", "nitrogen_kg_ha",
                 "soil_moisture_pct", controls=["slope_pct"], se="hc3")])
    write_project("volunteer-onboarding", "volunteers.csv", "volunteers", [
        analysis("onboarding-mentoring", "onboarding × mentoring", "volunteers", "hours_q1", "onboarding",
                 "mentoring", controls=["age"])], kept=("cells", "Cells plot"))
    write_project("helpdesk-staffing", "tickets.csv", "tickets", [
        analysis("staffing-shift", "agents × shift", "tickets", "resolution_hours", "agents_on_shift", "shift",
                 controls=["weekday"], se="hc3")])
    # "NA" is a region here (North America), so it is not a missing-value token.
    write_project("trial-conversion", "trials.csv", "trials", [
        analysis("sessions-size", "setup sessions × company size", "trials", "converted", "setup_sessions",
                 "employees", controls=["region"], family="logistic", scale="outcome")],
                  missing=("", "NaN", "."))
    write_project("turbine-repairs", "visits.csv", "visits", [
        analysis("experience-site", "experience × site", "visits", "repair_hours", "experience_years", "site",
                 controls=["wind_ms", "turbine_age"], se="cluster-robust", clusters="crew"),
        analysis("experience-wind", "experience × wind", "visits", "repair_hours", "experience_years", "wind_ms",
                 controls=["site", "turbine_age"], se="cluster-robust", clusters="crew", straight_line=True)])
    write_project("warehouse-picking", "pickers.csv", "pickers", [
        analysis("weeks-automation", "weeks on the job × automation", "pickers", "items_per_hour", "weeks_on_job",
                 "automation_pct", controls=["shift"], groups="warehouse", random_slopes=["weeks_on_job"])])
    write_project("desk-complaints", "desks.csv", "desks", [
        analysis("training-queue", "training × queue", "desks", "complaints", "training_hours", "queue_minutes",
                 controls=["desk_kind"], family="negative-binomial", scale="outcome", exposure="open_hrs")])


def main():
    for seed, scenario in enumerate([coffee_discount, orchard_nitrogen, volunteer_onboarding,
                                     helpdesk_staffing, trial_conversion, turbine_repairs, warehouse_picking,
                                     desk_complaints],
                                    start=20261):
        scenario(random.Random(seed))
    write_projects()


if __name__ == "__main__":
    main()
