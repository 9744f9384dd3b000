#!/usr/bin/python3
"""MPI identity test (CTest `mpi_identity`, registered only in a build with STARCENSUS_MPI): the same run
with one process and with `mpirun --oversubscribe -n 3` writes the same files, byte for byte, except the
fields that differ by design (listed in BY_DESIGN); errors under mpirun are one line and exit status 2.

Inputs: two FITS mocks of our simulator (the larger holds more than a third of all the input bytes, so
the scan cuts it into row ranges over the ranks, CatalogScan.h), an ECSV.gz and a plain CSV written by
astropy from a third mock. Usage: mpi_identity_test.py STARCENSUS MPIEXEC
"""
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

from astropy.table import Table

# provenance.json's creation time and stage timings (as in the thread-count determinism test,
# tests/reports/CommandLineTest.cpp) and the number of scanning processes; report.html's rows of the same
# fields; the creation date cairo writes into every PDF figure.
BY_DESIGN = ("created_utc", "timings_s", "scan_processes")


def masked(name, data):
    if name == "provenance.json":
        provenance = json.loads(data)
        for field in BY_DESIGN:
            provenance.pop(field)
        return json.dumps(provenance, sort_keys=True).encode()
    if name.endswith(".pdf"):
        return re.sub(rb"/CreationDate \([^)]*\)", b"/CreationDate ()", data)
    if name.endswith(".html"):
        for field in BY_DESIGN:
            data = re.sub(rb"<tr><td><code>" + field.encode() + rb"</code></td>.*?</tr>", b"", data,
                          flags=re.S)
        return data
    return data


def files_under(directory):
    return {str(p.relative_to(directory)): p.read_bytes() for p in sorted(directory.rglob("*")) if p.is_file()}


def main():
    starcensus, mpiexec = str(Path(sys.argv[1]).resolve()), sys.argv[2]
    mpirun = [mpiexec, "-q", "--oversubscribe", "-n", "3"]
    if os.geteuid() == 0:
        mpirun.insert(1, "--allow-run-as-root")
    failures = []

    def check(condition, what):
        if not condition:
            failures.append(what)
            print("FAILED:", what)

    with tempfile.TemporaryDirectory(prefix="starcensus-mpi-") as scratch:
        work = Path(scratch)

        # Open MPI's shared-memory transport copies large messages with process_vm_readv (CMA), which
        # containers without ptrace rights refuse; plain copies work everywhere.
        environment = dict(os.environ, OMPI_MCA_btl_vader_single_copy_mechanism="none")

        def run(command):
            return subprocess.run(command, cwd=work, capture_output=True, text=True, env=environment)

        for name, radius, seed in [("big.fits", "40", "3"), ("small.fits", "15", "4"), ("third.fits", "12", "6")]:
            result = run([starcensus, "simulate", "--out", name, "--truth", name + ".json", "--radius-max", radius,
                          "--seed", seed])
            assert result.returncode == 0, result.stderr
        third = Table.read(work / "third.fits")
        third[: len(third) // 2].write(work / "third_a.ecsv.gz", format="ascii.ecsv")
        third[len(third) // 2:].write(work / "third_b.csv", format="ascii.csv")
        inputs = ["big.fits", "small.fits", "third_a.ecsv.gz", "third_b.csv"]
        sizes = [(work / name).stat().st_size for name in inputs]
        check(sizes[0] > sum(sizes) / 3, "big.fits holds more than a third of the bytes (split into row ranges)")

        arguments = ["run", *inputs, "--radius", "5,10,20", "--draws", "200", "--seed", "11", "--out", "out"]
        single = run([starcensus, *arguments])
        assert single.returncode == 0, single.stderr
        shutil.move(work / "out", work / "single")
        spread = run([*mpirun, starcensus, *arguments])
        check(spread.returncode == 0, f"mpirun run exits 0 (stderr: {spread.stderr!r})")
        check(spread.stdout == single.stdout, "mpirun run prints what the single process prints")
        reference, candidate = files_under(work / "single"), files_under(work / "out")
        check(sorted(reference) == sorted(candidate), "the same output files")
        check("report.html" in reference and "provenance.json" in reference, "the run wrote its outputs")
        for name in sorted(set(reference) & set(candidate)):
            check(masked(name, reference[name]) == masked(name, candidate[name]), f"{name} byte for byte")
        print(f"compared {len(reference)} output files of 1 and 3 processes")
        provenance = json.loads(candidate["provenance.json"])
        check(provenance["scan_processes"] == 3, "provenance.json records 3 scanning processes")

        # Errors: one line naming the file (the single process's line), exit status 2, nothing written.
        damaged = (work / "third_a.ecsv.gz").read_bytes()
        (work / "damaged.ecsv.gz").write_bytes(damaged[: len(damaged) * 2 // 3])
        for bad in (["run", "big.fits", "small.fits", "damaged.ecsv.gz", "--out", "bad"],
                    ["run", "big.fits", "--radius", "abc", "--out", "bad"]):
            alone = run([starcensus, *bad])
            spread = run([*mpirun, starcensus, *bad])
            check(alone.returncode == 2 and spread.returncode == 2, f"{bad}: exit status 2 (got {spread.returncode})")
            check(spread.stderr == alone.stderr and spread.stderr.count("\n") == 1 and
                  spread.stderr.startswith("starcensus: error: "),
                  f"{bad}: one error line, the single process's ({spread.stderr!r})")
            check(not (work / "bad").exists(), f"{bad}: nothing written")
        # A rank whose options alone are bad (mpirun's MPMD form gives ranks different arguments): the
        # others still finish the gather, rank 0 prints that rank's line; first the workers, then rank 0.
        good = ["run", "big.fits", "small.fits", "--out", "bad"]
        bad = ["run", "big.fits", "small.fits", "--radius", "abc", "--out", "bad"]
        expected = run([starcensus, *bad]).stderr
        for first, rest in ((good, bad), (bad, good)):
            mixed = run([*mpirun[:-2], "-n", "1", starcensus, *first, ":", "-n", "2", starcensus, *rest])
            check(mixed.returncode == 2 and mixed.stderr == expected,
                  f"one rank with bad options ({first is bad}): exit 2 and its one line ({mixed.stderr!r})")
            check(not (work / "bad").exists(), "one rank with bad options: nothing written")
    if failures:
        sys.exit(f"{len(failures)} check(s) failed")
    print("mpi identity: all checks passed")


if __name__ == "__main__":
    main()
