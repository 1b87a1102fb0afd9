"""Hostile files, paths and options (issue 12, sections 4 and 5 and the bad options of §2).

Each test is one reproducer of the issue's adversarial pass.  What every one of them checks
is the contract of the command line for user mistakes: exit code 2, one line on standard
error naming the file, option or place and what is wrong (no traceback), nothing on
standard output, and nothing written half-way (no store, no certificate).  Reproducers that
used to hang or allocate gigabytes run in a subprocess with a time limit and an address-
space limit, so that a regression fails quickly instead of exhausting the machine.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import resource
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from verifier.certificates import canonical, seal
from verifier.cli import main
from verifier.families import make_family
from verifier.run.runner import OptionError, RunOptions, max_workers, run

ROOT = Path(__file__).resolve().parent.parent

CLAIM = """[[claim]]
name = "r"
statement = "euler(K) == euler(K)"
  [[claim.over]]
  family = "all-complexes"
  max_vertices = 3
"""

FILE_CLAIM = """[[claim]]
name = "data"
statement = "euler(K) == euler(K)"
  [[claim.over]]
  family = "file"
  path = "{path}"
"""


def _limited():
    resource.setrlimit(resource.RLIMIT_AS, (4 * 2**30, 4 * 2**30))


def cli(*args, timeout=60, cwd=None):
    """The command in a subprocess with 4 GB of address space and a time limit."""
    return subprocess.run([sys.executable, "-m", "verifier", *map(str, args)],
                          capture_output=True, text=True, timeout=timeout,
                          cwd=cwd or ROOT, preexec_fn=_limited)


def refused(result) -> str:
    """The one-line error of a refused command (asserting the contract), as one string."""
    assert result.returncode == 2, (result.returncode, result.stdout, result.stderr)
    assert "Traceback" not in result.stderr
    assert result.stdout == ""
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 or all(line.startswith(" ") for line in lines[1:]), result.stderr
    return " ".join(result.stderr.split())


def refused_in_process(capsys, *args) -> str:
    assert main([str(a) for a in args]) == 2
    captured = capsys.readouterr()
    assert captured.out == "" and "Traceback" not in captured.err
    return " ".join(captured.err.split())


def files_in(folder: Path) -> list[str]:
    return sorted(str(p.relative_to(folder)) for p in folder.rglob("*"))


def run_args(tmp_path, *extra):
    return ["run", *extra, "--quiet", "--workers", "1", "--store", tmp_path / "out" / "s.sqlite",
            "--certificates", tmp_path / "out" / "certs"]


# ============================================================ §4: verifier check
def test_check_refuses_deep_json_nesting(tmp_path):
    path = tmp_path / "deep.json"
    path.write_text("[" * 100_000 + "]" * 100_000)
    message = refused(cli("check", path))
    assert message == (f"error: {path}: certificate is nested too deeply (lists or objects "
                       "inside one another beyond what the reader accepts)")


def test_check_refuses_an_unpaired_surrogate_escape(tmp_path):
    # "\ud800" is valid JSON, but no UTF-8 text can hold it; it used to crash the hash
    path = tmp_path / "surrogate.json"
    path.write_text('{"schema": "x", "claim": {"name": "\\ud800"}}')
    message = refused(cli("check", path))
    assert message == (f"error: {path}: certificate holds an unpaired surrogate escape (such "
                       "as \\ud800), which is not a character")


def test_check_refuses_a_5000_digit_number(tmp_path):
    path = tmp_path / "digits.json"
    path.write_text('{"cases": ' + "7" * 5000 + "}")
    message = refused(cli("check", path))
    assert message == (f"error: {path}: certificate holds an integer of 5,000 digits (at most "
                       "1,000 are accepted)")


def test_check_refuses_a_directory(tmp_path, capsys):
    message = refused_in_process(capsys, "check", tmp_path)
    assert message == f"error: {tmp_path}: certificate is a directory, not a regular file"


def test_check_refuses_dev_zero_without_reading_it():
    result = cli("check", "/dev/zero", timeout=20)
    assert refused(result) == "error: /dev/zero: certificate is a device, not a regular file"


def test_check_reads_at_most_the_byte_cap(tmp_path):
    # a sparse regular file of 4 GiB: refused after reading just over 32 MiB
    path = tmp_path / "huge.json"
    with open(path, "wb") as handle:
        handle.truncate(4 * 2**30)
    message = refused(cli("check", path, timeout=30))
    assert message == (f"error: {path}: certificate is larger than 33,554,432 bytes (the limit "
                       "for one file)")


def test_check_refuses_every_file_before_checking_any(tmp_path, capsys):
    junk = tmp_path / "junk.json"
    junk.write_text("{not json")
    message = refused_in_process(capsys, "check", tmp_path / "missing.json", junk)
    assert message == f"error: {tmp_path / 'missing.json'}: no such file"


def _pass_certificate(over: list[dict], cases: int) -> dict:
    claim = {"name": "announced", "title": "announced", "statement": "euler(K) == euler(K)",
             "where": None, "expect": "holds", "evidence": "exact", "source": "conjecture",
             "max_cases": None, "over": over}
    claim["sha256"] = hashlib.sha256(canonical(claim).encode()).hexdigest()
    claim["file"] = "announced.toml"
    return seal({"schema": "simplicial-verifier/certificate/1", "kind": "pass",
                 "claim": claim, "cases": cases, "outcomes": {"holds": cases},
                 "digest": "0" * 64, "evidence": "exact"})


def test_check_compares_the_announced_plan_before_planning(tmp_path):
    # a 3 KB certificate claiming 58 cases over ten million random flag complexes: the
    # families' size is known without enumerating them, so the mismatch is immediate
    spec = make_family({"family": "random-flag", "vertices": [6, 14], "edge_probability": 0.4,
                        "count": 10_000_000, "seed": 11}).spec()
    path = tmp_path / "announced.json"
    path.write_text(json.dumps(_pass_certificate([dict(spec, bind="K")], 58)))
    assert path.stat().st_size < 3_000
    result = cli("check", path, timeout=30)
    assert result.returncode == 1, result.stderr
    assert " ".join(result.stdout.split()) == (
        f"NOT verified {path} pass announced: mismatch: the certificate's families plan "
        "10,000,000 cases, it says 58 (nothing was evaluated)")


def test_check_refuses_a_counterexample_too_large_to_rebuild(tmp_path):
    # a resealed counterexample whose complex is one 30-vertex facet (2^30 - 1 faces):
    # refused from its facet sizes, before the re-check process builds anything
    claim = {"name": "big", "statement": "euler(K) == 0", "where": None,
             "over": [{"family": "catalog", "bind": "K"}]}
    claim["sha256"] = hashlib.sha256(canonical(claim).encode()).hexdigest()
    path = tmp_path / "big.json"
    path.write_text(json.dumps(seal({"schema": "simplicial-verifier/certificate/1",
                                     "kind": "counterexample", "claim": claim,
                                     "complex": {"facets": [list(range(30))]}, "values": []})))
    assert refused(cli("check", path, timeout=30)) == (
        f"error: {path}: refused before re-checking: complex, facet 0: a facet of 30 vertices "
        "has 1,073,741,823 faces, more than the 1,000,000 simplices allowed for one complex")


# ============================================================ §4: verifier show
def test_show_refuses_a_22_vertex_facet_before_building_it(tmp_path):
    path = tmp_path / "facet22.txt"
    path.write_text(" ".join(str(i) for i in range(22)) + "\n")
    message = refused(cli("show", path, timeout=30))
    assert message == (f"error: {path}:1: a facet of 22 vertices has 4,194,303 faces, more "
                       "than the 1,000,000 simplices allowed for one complex (--max-simplices "
                       "raises the limit, up to 10,000,000)")


def test_show_counts_a_long_path_before_building_it(tmp_path):
    # 10^6 lines 'i i+1': the bound sum(2^|f| - 1) = 3,000,000 is over the cap, so the
    # faces are counted exactly, stopping as soon as the count passes the cap
    path = tmp_path / "path.txt"
    path.write_text("".join(f"{i} {i + 1}\n" for i in range(10**6)))
    message = refused(cli("show", path, timeout=30))
    assert message == (f"error: {path}: the facets span more than 1,000,000 simplices (the "
                       "limit for one complex) (--max-simplices raises the limit, up to "
                       "10,000,000)")


def test_show_with_a_raised_cap_builds_a_path_within_memory(tmp_path, capsys):
    # the same shape, 10^4 edges: nothing on the way allocates more than the complex needs
    path = tmp_path / "path.txt"
    path.write_text("".join(f"{i} {i + 1}\n" for i in range(10**4)))
    assert main(["show", str(path), "--max-simplices", "20001"]) == 0
    assert "[10001, 10000]" in capsys.readouterr().out
    message = refused_in_process(capsys, "show", path, "--max-simplices", "20000")
    assert "the facets span more than 20,000 simplices" in message


def test_show_refuses_a_broken_graphml_file(tmp_path):
    # it used to be read as a text facet file and shown as a complex, exit 0
    path = tmp_path / "broken.graphml"
    path.write_text('<?xml version="1.0"?>\n<graphml><graph edgedefault="undirected">'
                    '<node id="a"/><edge source="a" tar')
    message = refused(cli("show", path))
    assert message.startswith(f"error: {path}: not a valid graphml graph (")


def test_show_refuses_dev_zero_without_reading_it():
    assert refused(cli("show", "/dev/zero", timeout=20)) == \
        "error: /dev/zero: complex file is a device, not a regular file"


def test_show_refuses_a_folder(tmp_path, capsys):
    target = tmp_path / "folder.txt"
    target.mkdir()
    assert refused_in_process(capsys, "show", target) == \
        f"error: {target}: complex file is a directory, not a regular file"


def test_show_refuses_hostile_json_facet_files(tmp_path, capsys):
    deep = tmp_path / "deep.json"
    deep.write_text("[" * 50_000 + "]" * 50_000)
    assert refused_in_process(capsys, "show", deep) == (
        f"error: {deep}: facet file is nested too deeply (lists or objects inside one another "
        "beyond what the reader accepts)")
    digits = tmp_path / "digits.json"
    digits.write_text("[[1, " + "9" * 5000 + "]]")
    assert refused_in_process(capsys, "show", digits) == (
        f"error: {digits}: facet file holds an integer of 5,000 digits (at most 1,000 are "
        "accepted)")


# =================================== §4: the same bad files as a `file` family (load time)
def _bad_data(folder: Path, kind: str) -> str:
    if kind == "facet22.txt":
        (folder / kind).write_text(" ".join(str(i) for i in range(22)) + "\n")
        return "facet22.txt:1: a facet of 22 vertices has 4,194,303 faces"
    if kind == "broken.graphml":
        (folder / kind).write_text('<?xml version="1.0"?>\n<graphml><graph><node id="a"/>')
        return "broken.graphml: not a valid graphml graph ("
    if kind == "deep.json":
        (folder / kind).write_text("[" * 50_000 + "]" * 50_000)
        return "deep.json: facet file is nested too deeply"
    if kind == "fifo.txt":
        os.mkfifo(folder / kind)
        return "fifo.txt: data file is a FIFO (named pipe), not a regular file"
    raise AssertionError(kind)


@pytest.mark.parametrize("kind", ["facet22.txt", "broken.graphml", "deep.json", "fifo.txt"])
def test_bad_data_files_are_refused_when_claims_load(tmp_path, kind):
    expected = _bad_data(tmp_path, kind)
    claim = tmp_path / "c.toml"
    claim.write_text(FILE_CLAIM.format(path=kind))
    message = refused(cli(*run_args(tmp_path, claim), "--case-timeout", "5", timeout=60))
    assert message.startswith(f"error: {claim}:6:10: family 'file', parameter 'path': ")
    assert expected in message
    assert not (tmp_path / "out").exists()            # no store, no certificate


# ====================================================== §5: where data may come from
def _outside_targets(tmp_path: Path) -> dict[str, tuple[str, str]]:
    """path written in the claim -> (what the message must contain)."""
    outside = tmp_path / "outside"
    outside.mkdir()
    (outside / "secret.txt").write_text("1 2\n")
    claims = tmp_path / "claims"
    (claims / "data").mkdir(parents=True)
    (claims / "data" / "passwd.txt").symlink_to("/etc/passwd")
    (claims / "escape.txt").symlink_to(outside / "secret.txt")
    base = repr(str(claims))
    return {
        "/etc/passwd": "absolute path '/etc/passwd' refused; data files must lie inside the "
                       "claim file's folder, or in a folder allowed with --data-folder",
        "/proc/self/environ": "absolute path '/proc/self/environ' refused",
        "../outside/secret.txt": f"'../outside/secret.txt' leads to "
                                 f"{str(outside / 'secret.txt')!r}, outside {base}",
        "../../../../../../../../etc": "'../../../../../../../../etc' leads to '/etc', outside",
        "escape.txt": f"'escape.txt' leads to {str(outside / 'secret.txt')!r}, outside {base}",
        "data/passwd.txt": f"'data/passwd.txt' leads to '/etc/passwd', outside {base}",
        "data": f"{str(claims / 'data' / 'passwd.txt')!r} is a link to '/etc/passwd', "
                f"outside {base}",
    }


def test_file_family_stays_inside_the_claim_files_folder(tmp_path, capsys):
    for path, expected in _outside_targets(tmp_path).items():
        claim = tmp_path / "claims" / "c.toml"
        claim.write_text(FILE_CLAIM.format(path=path))
        message = refused_in_process(capsys, *run_args(tmp_path, claim))
        assert message.startswith(f"error: {claim}:6:10: family 'file', parameter 'path': ")
        assert expected in message, (path, message)
    assert not (tmp_path / "out").exists()


def test_file_family_tables_cannot_set_the_tools_own_keys(tmp_path, capsys):
    # a nested table that names its own base folder would escape the claim file's folder
    claim = tmp_path / "c.toml"
    claim.write_text('[[claim]]\nname = "r"\nstatement = "euler(K) == 1"\n'
                     '  [[claim.over]]\n  family = "cone"\n'
                     '  of = { family = "file", path = "etc/passwd", _base = "/" }\n')
    assert refused_in_process(capsys, *run_args(tmp_path, claim)) == (
        f"error: {claim}:6:8: unknown key '_base' in 'over' entry (keys starting with '_' are "
        "reserved for the tool)")


def test_a_folder_allowed_explicitly_and_the_data_hash_in_the_certificate(tmp_path, capsys):
    data = tmp_path / "shared-data"
    data.mkdir()
    (data / "triangle.txt").write_text("1 2 3\n")
    claims = tmp_path / "claims"
    claims.mkdir()
    claim = claims / "c.toml"
    claim.write_text(FILE_CLAIM.format(path=data / "triangle.txt"))
    assert "absolute path" in refused_in_process(capsys, *run_args(tmp_path, claim))
    assert main([str(a) for a in run_args(tmp_path, claim)] + ["--data-folder", str(data)]) == 0
    capsys.readouterr()
    certificate = tmp_path / "out" / "certs" / "data.json"
    over = json.loads(certificate.read_text())["claim"]["over"][0]
    assert over["_sha256"] == {"triangle.txt": hashlib.sha256(b"1 2 3\n").hexdigest()}
    # the checker opens no path the certificate names: without a data folder it refuses
    message = refused_in_process(capsys, "check", certificate)
    assert message == (f"error: {certificate}: its families read data files ({data / 'triangle.txt'}); "
                       "name the folder that holds them with --data-folder DIR (no path a "
                       "certificate names is opened)")
    copy = tmp_path / "copy"
    copy.mkdir()
    (copy / "triangle.txt").write_text("1 2 3\n")
    (data / "triangle.txt").unlink()                    # the recorded path is gone
    assert main(["check", str(certificate), "--data-folder", str(copy)]) == 0
    assert "verified" in capsys.readouterr().out
    (copy / "triangle.txt").write_text("1 2\n")         # other data, same name
    assert main(["check", str(certificate), "--data-folder", str(copy)]) == 1
    out = " ".join(capsys.readouterr().out.split())
    assert "mismatch: the data file 'triangle.txt' differs from the one the claim was run " \
           "with" in out


def test_check_never_opens_a_fifo_a_certificate_names(tmp_path):
    # a resealed certificate pointing its file family at a FIFO: opening it would block
    fifo = tmp_path / "pipe.txt"
    os.mkfifo(fifo)
    spec = {"family": "file", "path": str(fifo), "as": "1-dimensional",
            "_base": str(tmp_path), "_sha256": {"pipe.txt": "0" * 64}, "bind": "K"}
    path = tmp_path / "fifo-cert.json"
    path.write_text(json.dumps(_pass_certificate([spec], 1)))
    message = refused(cli("check", path, timeout=20))
    assert message.startswith(f"error: {path}: its families read data files ({fifo})")
    with_folder = cli("check", path, "--data-folder", tmp_path, timeout=20)
    assert with_folder.returncode == 1
    assert "data file is a FIFO (named pipe), not a regular file" in with_folder.stdout


# ====================================================== §5: store and output paths
def _store_cases(tmp_path: Path) -> dict[str, tuple[list, str]]:
    (tmp_path / "a-folder.sqlite").mkdir()
    (tmp_path / "plain-file").write_text("x")
    (tmp_path / "text.sqlite").write_text("not a database\n")
    with sqlite3.connect(tmp_path / "other.sqlite") as db:
        db.execute("CREATE TABLE invoices (id INTEGER)")
    t = tmp_path
    return {
        "store is a folder": (["--store", t / "a-folder.sqlite"],
                              f"--store: store {str(t / 'a-folder.sqlite')!r} is a folder; "
                              "--store names an SQLite file"),
        "store under a file": (["--store", t / "plain-file" / "s.sqlite"],
                               f"--store: store {str(t / 'plain-file' / 's.sqlite')!r} cannot "
                               f"be created: {str(t / 'plain-file')!r} is a file, not a folder"),
        "store is not a database": (["--store", t / "text.sqlite"],
                                    f"--store: store {str(t / 'text.sqlite')!r} is not an "
                                    "SQLite file (a store is one)"),
        "store is another database": (["--store", t / "other.sqlite"],
                                      f"--store: store {str(t / 'other.sqlite')!r} is an SQLite "
                                      "database of something else (tables: invoices)"),
        "certificates is a file": (["--certificates", t / "plain-file"],
                                   f"--certificates {str(t / 'plain-file')!r} is a file, not a "
                                   "folder"),
        "certificates under a file": (["--certificates", t / "plain-file" / "certs"],
                                      f"--certificates {str(t / 'plain-file' / 'certs')!r} cannot "
                                      f"be created: {str(t / 'plain-file')!r} is a file"),
    }


def test_store_and_certificate_paths_are_checked_before_any_work(tmp_path, capsys):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    cases = _store_cases(tmp_path)
    before = files_in(tmp_path)
    for name, (options, expected) in cases.items():
        arguments = ["run", claim, "--quiet", "--workers", "1"]
        if "--store" not in options:
            arguments += ["--store", tmp_path / "new" / "s.sqlite"]
        if "--certificates" not in options:
            arguments += ["--certificates", tmp_path / "new" / "certs"]
        message = refused_in_process(capsys, *arguments, *options)
        assert message.startswith("error: " + expected), (name, message)
        assert files_in(tmp_path) == before, name   # nothing created, nothing changed


def test_read_only_places_are_refused_before_any_work(tmp_path, capsys):
    probe = Path("/sys/verifier-probe")
    try:
        probe.write_text("")
        pytest.skip("/sys is writable here")
    except OSError:
        pass
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    message = refused_in_process(capsys, "run", claim, "--quiet", "--store", "/sys/s.sqlite",
                                 "--certificates", tmp_path / "certs")
    assert message.startswith("error: --store: store '/sys/s.sqlite': cannot create files in "
                              "'/sys' (")
    message = refused_in_process(capsys, "run", claim, "--quiet", "--store",
                                 tmp_path / "s.sqlite", "--certificates", "/sys/certs")
    assert message.startswith("error: --certificates '/sys/certs': cannot create files in "
                              "'/sys' (")
    assert files_in(tmp_path) == ["r.toml"]


def test_summary_of_a_store_that_is_a_folder(tmp_path, capsys):
    store = tmp_path / "folder.sqlite"
    store.mkdir()
    assert refused_in_process(capsys, "summary", "--store", store) == (
        f"error: store {str(store)!r} is a directory, not a store file")


@pytest.mark.skipif(os.geteuid() == 0, reason="permissions do not bind root")
def test_a_read_only_store_is_refused_before_any_work(tmp_path, capsys):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    store = tmp_path / "s.sqlite"
    assert main(["run", str(claim), "--quiet", "--store", str(store), "--certificates",
                 str(tmp_path / "certs")]) == 0
    capsys.readouterr()
    store.chmod(0o444)
    message = refused_in_process(capsys, "run", claim, "--quiet", "--store", store)
    assert message.startswith(f"error: --store: store {str(store)!r} cannot be written (")


# =============================================================== §5: claim files
def test_two_thousand_nested_of_tables(tmp_path, capsys):
    inner = '{ family = "catalog", names = ["torus-7"] }'
    for _ in range(2000):
        inner = '{ family = "refine", times = 1, of = ' + inner + " }"
    claim = tmp_path / "nested.toml"
    claim.write_text('[[claim]]\nname = "r"\nstatement = "euler(K) == 0"\nover = [' + inner
                     + "]\n")
    message = refused_in_process(capsys, *run_args(tmp_path, claim))
    # the 41st bracket: '[' at column 8, then one '{' every 37 characters
    assert message == (f"error: {claim}:4:{8 + 39 * 37 + 1}: arrays or tables nested more "
                       "than 40 deep")
    assert not (tmp_path / "out").exists()


def test_family_tables_nested_past_the_family_limit(tmp_path, capsys):
    inner = '{ family = "catalog", names = ["torus-7"] }'
    for _ in range(20):
        inner = '{ family = "cone", of = ' + inner + " }"
    claim = tmp_path / "nested.toml"
    claim.write_text('[[claim]]\nname = "r"\nstatement = "euler(K) == 1"\n'
                     '  [[claim.over]]\n  family = "cone"\n  of = ' + inner + "\n")
    assert refused_in_process(capsys, *run_args(tmp_path, claim)) == (
        f"error: {claim}:6:8: family tables are nested more than 16 deep (at of.of.of...)")


def test_a_300_character_claim_name_is_refused_up_front(tmp_path, capsys):
    claim = tmp_path / "long.toml"
    claim.write_text(CLAIM.replace('name = "r"', f'name = "{"a" * 300}"'))
    assert refused_in_process(capsys, *run_args(tmp_path, claim)) == (
        f"error: {claim}:2:8: claim name 'aaaaaaaaaaaaaaaaaaaa...' has 300 characters; at most "
        "80 are allowed (it also names the certificate file)")
    assert not (tmp_path / "out").exists()


def test_an_inline_over_entry_that_is_not_a_table_has_a_position(tmp_path, capsys):
    claim = tmp_path / "over.toml"
    claim.write_text('[[claim]]\nname = "r"\nstatement = "euler(K) == 1"\nover = [1]\n')
    assert refused_in_process(capsys, *run_args(tmp_path, claim)) == (
        f"error: {claim}:4:8: each 'over' entry must be a table such as "
        '{ family = "catalog" }, got 1')


def test_a_fifo_as_the_claim_file_does_not_block(tmp_path):
    fifo = tmp_path / "claims.toml"
    os.mkfifo(fifo)
    message = refused(cli(*run_args(tmp_path, fifo), timeout=20))
    assert message == f"error: {fifo}: claim file is a FIFO (named pipe), not a regular file"
    assert not (tmp_path / "out").exists()


# =================================================================== §5: resume
def test_resume_without_a_store_says_there_is_nothing_to_resume(tmp_path, capsys):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    message = refused_in_process(capsys, *run_args(tmp_path, claim), "--resume")
    assert message == (f"error: --resume: nothing to resume: there is no store "
                       f"{str(tmp_path / 'out' / 's.sqlite')!r} (run without --resume to start "
                       "a run)")
    assert not (tmp_path / "out").exists()


def test_resume_of_a_finished_run_says_so_and_starts_nothing(tmp_path, capsys):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    assert main([str(a) for a in run_args(tmp_path, claim)]) == 0
    capsys.readouterr()
    store = tmp_path / "out" / "s.sqlite"
    with sqlite3.connect(store) as db:
        (run_id,) = db.execute("SELECT run_id FROM runs").fetchone()
    message = refused_in_process(capsys, *run_args(tmp_path, claim), "--resume")
    assert message == (f"error: --resume: nothing to resume in {str(store)!r}: the last run of "
                       f"these claims ({run_id}) is finished (run without --resume to start a "
                       "new run)")
    with sqlite3.connect(store) as db:
        assert db.execute("SELECT COUNT(*) FROM runs").fetchone()[0] == 1


# ======================================================== §2: bad options
@pytest.mark.parametrize("value", ["nan", "0", "-1", "inf", "-0.5", "1e400"])
def test_case_timeout_must_be_a_finite_positive_number(tmp_path, capsys, value):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    message = refused_in_process(capsys, *run_args(tmp_path, claim), "--case-timeout", value)
    shown = repr(float(value))
    assert message == ("error: --case-timeout must be a number of seconds with 0 < seconds "
                       f"<= 604800, got {shown}")
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("value", ["150", "0", "-3"])
def test_workers_are_capped_by_the_cores(tmp_path, capsys, value):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    arguments = [a for a in run_args(tmp_path, claim) if a not in ("--workers", "1")]
    message = refused_in_process(capsys, *arguments, "--workers", value)
    assert message == (f"error: --workers must be an integer from 1 to {max_workers()} (4 per "
                       f"core on this machine), got {int(value)}")
    assert max_workers() == 4 * (os.cpu_count() or 1)
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("arguments, expected", [
    (["--max-cases", "0"], "--max-cases must be an integer from 1 to 1,000,000,000,000, got 0"),
    (["--case-memory", "0"], "--case-memory must be a number of megabytes from 1 to "),
    (["--case-memory", str(10**9)], "--case-memory must be a number of megabytes from 1 to "),
    (["--workers", "2.5"], "verifier run: argument --workers: expected an integer, got '2.5' "
                           "(see verifier run --help)"),
    (["--case-timeout", "soon"], "verifier run: argument --case-timeout: expected a number, "
                                 "got 'soon' (see verifier run --help)"),
    (["--data-folder", "/no/such/folder"], "--data-folder '/no/such/folder': no such folder"),
])
def test_other_run_options_are_validated(tmp_path, capsys, arguments, expected):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    message = refused_in_process(capsys, *run_args(tmp_path, claim), *arguments)
    assert message.startswith("error: " + expected), message
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("arguments, expected", [
    (["check", "x.json", "--sample", "0"],
     "verifier check: argument --sample: expected an integer from 1 to 1,000,000,000, got 0"),
    (["check", "x.json", "--seed", "-1"],
     "verifier check: argument --seed: expected an integer from 0 to "
     "9,223,372,036,854,775,807, got -1"),
    (["check", "x.json", "--seed", "9" * 5000],
     "verifier check: argument --seed: expected an integer, got '9999999999"),
    (["search", "r.toml", "--seconds", "nan"],
     "verifier search: argument --seconds: expected a number of seconds with 0 < seconds <= "
     "604800, got 'nan'"),
    (["search", "r.toml", "--seconds", "-5"],
     "verifier search: argument --seconds: expected a number of seconds"),
    (["search", "r.toml", "--max-vertices", "1000"],
     "verifier search: argument --max-vertices: expected an integer from 1 to 30, got 1000"),
    (["search", "r.toml", "--max-dim", "-1"],
     "verifier search: argument --max-dim: expected an integer from 0 to 10, got -1"),
    (["show", "torus-7", "--max-simplices", "0"],
     "verifier show: argument --max-simplices: expected an integer from 1 to 10,000,000, got 0"),
    (["energy", "torus-7", "--temperatures", "nan:1:3"],
     "--temperatures: need finite A > 0, B > 0 and 2 <= N <= 10000, got 'nan:1:3'"),
    (["energy", "torus-7", "--temperatures", "2:1:1000000000"],
     "--temperatures: need finite A > 0, B > 0 and 2 <= N <= 10000, got '2:1:1000000000'"),
])
def test_numeric_options_of_every_command_are_validated(tmp_path, capsys, arguments, expected):
    message = refused_in_process(capsys, *arguments)
    assert message.startswith("error: " + expected), message


def test_run_options_are_validated_for_library_callers_too(tmp_path):
    claim = tmp_path / "r.toml"
    claim.write_text(CLAIM)
    for bad in ({"case_timeout": math.nan}, {"workers": 10**6}, {"max_cases": 0},
                {"engine": "threads"}, {"scheduler": "tcp://x:1"}):
        with pytest.raises(OptionError):
            run([claim], RunOptions(store=str(tmp_path / "s.sqlite"), **bad))
    assert files_in(tmp_path) == ["r.toml"]
