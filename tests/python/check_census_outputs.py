#!/usr/bin/python3
"""Independent check of a run's outputs (tests/reports): reads hosts.fits and draws.fits with astropy and
checks priors.json against scipy.stats.

Usage: check_census_outputs.py DIRECTORY

Prints JSON on standard output:
  {"hosts": {"rows": N, "columns": [...], "units": {...}, "min_p_member": x, "hostrad_pc": R},
   "draws": {"rows": N, "columns": [...], "members_equal_class_sums": bool, "fractions_sum_to_one": bool},
   "priors": {"dirichlet_fraction": x, "group_beta_fraction": x, "gamma_level": x},
   "systems": {"rows": N, "columns": [...], "multiple": N, "members_agree": bool, "roles_agree": bool,
               "members_width": N, "longest_members": N}}
where the priors entries are the largest differences between the stored Monte Carlo quantiles and the
fitted distributions: |scipy.stats.beta.ppf(p, alpha_c, a0 - alpha_c) - stored| for the Dirichlet marginals
(the aggregation property of the Dirichlet), the same for the groups' Betas, and
|scipy.stats.gamma.cdf(stored, shape, scale=1/rate) - p| for the densities. For systems.fits against
sample.fits: members_agree when every system's n_members equals the sample rows with its system_id and its
member list names those rows' source_ids; roles_agree when each multiple system has one primary (its
primary_source_id) and singles are the one-member systems.
"""
import json
import math
import sys

import numpy as np
from astropy.io import fits
from astropy.table import Table
from scipy import stats

P68 = 0.682689492137086
P95 = 0.954499736103642
LEVELS = {"median": 0.5, "lo68": 0.5 - P68 / 2, "hi68": 0.5 + P68 / 2, "lo95": 0.5 - P95 / 2, "hi95": 0.5 + P95 / 2}
CLASSES = ["O", "B", "A", "F", "G", "K", "M", "L", "T", "Y", "WD", "evolved", "unclassified"]


def main(directory):
    hosts = Table.read(f"{directory}/hosts.fits")
    header = fits.getheader(f"{directory}/hosts.fits", 1)
    draws = Table.read(f"{directory}/draws.fits")
    n_columns = [f"n_{name}" for name in CLASSES]
    f_columns = [f"f_{name}" for name in CLASSES]
    class_sums = np.sum([np.asarray(draws[c]) for c in n_columns], axis=0)
    fraction_sums = np.sum([np.asarray(draws[c]) for c in f_columns], axis=0)
    with_members = np.asarray(draws["members"]) > 0

    with open(f"{directory}/priors.json") as handle:
        priors = json.load(handle)
    dirichlet_worst = beta_worst = gamma_worst = 0.0
    for radius in priors["radii"]:
        dirichlet = radius["class_fractions"]
        concentration = dirichlet["concentration"]
        for name, alpha in zip(dirichlet["classes"], dirichlet["alpha"]):
            stored = radius["classes"][name]["fraction"]
            for key, p in LEVELS.items():
                fitted = stats.beta.ppf(p, alpha, concentration - alpha)
                dirichlet_worst = max(dirichlet_worst, abs(fitted - stored[key]))
        for name, entry in radius["classes"].items():
            beta = entry["fraction"]["beta"]
            gamma = entry["density_pc3"]["gamma"]
            for key, p in LEVELS.items():
                if not entry["standard_class"]:
                    fitted = stats.beta.ppf(p, beta["alpha"], beta["beta"])
                    beta_worst = max(beta_worst, abs(fitted - entry["fraction"][key]))
                level = stats.gamma.cdf(entry["density_pc3"][key], gamma["shape"], scale=1.0 / gamma["rate_pc3"])
                gamma_worst = max(gamma_worst, abs(level - p))

    systems = Table.read(f"{directory}/systems.fits")
    sample = Table.read(f"{directory}/sample.fits")
    members_of = {}
    for source_id, system_id, role in zip(sample["source_id"], sample["system_id"], sample["system_role"]):
        members_of.setdefault(int(system_id), []).append((str(source_id), str(role).strip()))
    members_agree = True
    roles_agree = True
    for system_id, n_members, primary, members in zip(systems["system_id"], systems["n_members"],
                                                      systems["primary_source_id"], systems["members"]):
        rows = members_of.get(int(system_id), [])
        listed = str(members).split()
        members_agree &= len(rows) == int(n_members) and sorted(listed) == sorted(r[0] for r in rows)
        roles = sorted(r[1] for r in rows)
        if int(n_members) == 1:
            roles_agree &= roles == ["single"]
        else:
            roles_agree &= roles.count("primary") == 1 and dict((r[1], r[0]) for r in rows)["primary"] == str(primary)
            roles_agree &= listed[0] == str(primary)

    print(json.dumps({
        "systems": {
            "rows": len(systems),
            "columns": systems.colnames,
            "multiple": int(np.sum(np.asarray(systems["n_members"]) > 1)),
            "members_agree": bool(members_agree),
            "roles_agree": bool(roles_agree),
            # the members column is as wide as the longest list (astropy reads the TFORM width)
            "members_width": int(systems["members"].dtype.itemsize),
            "longest_members": max((len(str(m)) for m in systems["members"]), default=0),
        },
        "hosts": {
            "rows": len(hosts),
            "columns": hosts.colnames,
            "units": {name: str(hosts[name].unit) if hosts[name].unit is not None else "" for name in hosts.colnames},
            "min_p_member": float(np.min(hosts["p_member"])) if len(hosts) else math.nan,
            "hostrad_pc": header["HOSTRAD"],
        },
        "draws": {
            "rows": len(draws),
            "columns": draws.colnames,
            "members_equal_class_sums": bool(np.all(class_sums == np.asarray(draws["members"]))),
            "fractions_sum_to_one": bool(np.allclose(fraction_sums[with_members], 1.0, atol=1e-9)),
        },
        "priors": {"dirichlet_fraction": dirichlet_worst, "group_beta_fraction": beta_worst,
                   "gamma_level": gamma_worst},
    }))


if __name__ == "__main__":
    main(sys.argv[1])
