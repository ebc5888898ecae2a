#!/usr/bin/env python3
"""Collects the fuzzers' seed corpora from the repository's test data.

usage: pack_seeds.py <repository root> <output folder>

Writes <output>/{study,csv,las,formula}/ with one seed per file:
  study    every study YAML in tests/data and samples/, followed by the data
           files it names (tokens ending in .csv or .las that exist next to
           it), each after a "#%% file: <path>" line (the format
           tests/fuzz/study_fuzz.cc splits);
  csv      every .csv there, after one options byte 0x00 (',' header '#');
  las      every .las there;
  formula  the model statements of the NIST StRD files in tests/data/nist
           (without the "+ e" error term) and every one-line 'formula:' in
           the study files.
Nothing is copied into the repository; the output is a build folder.
"""
import pathlib
import re
import sys

SEPARATOR = b"#%% file: "
DATA_NAME = re.compile(rb"[A-Za-z0-9_./-]+\.(?:csv|las)\b")


def data_files(root, roots):
    for top in roots:
        yield from sorted((root / top).rglob("*"))


def pack_study(yaml_path, max_files=6):
    text = yaml_path.read_bytes()
    seed = text if text.endswith(b"\n") else text + b"\n"
    seen = []
    for m in DATA_NAME.finditer(text):
        name = m.group(0).decode()
        target = yaml_path.parent / name
        if name in seen or not target.is_file() or len(seen) == max_files:
            continue
        seen.append(name)
        seed += SEPARATOR + name.encode() + b"\n" + target.read_bytes()
    return seed


def formulas_from_nist(path):
    lines = path.read_text(errors="replace").splitlines()
    for i, line in enumerate(lines):
        if line.startswith("Model:"):
            break
    else:
        return None
    statement = []
    for line in lines[i + 1:]:
        s = line.strip()
        if re.match(r"(y|log\[y\])\s*=", s) or statement:
            statement.append(s)
            if s.endswith("+  e") or s.endswith("+ e"):
                break
    if not statement:
        return None
    text = " ".join(statement)
    return re.sub(r"\+\s*e$", "", text).strip()


def main():
    root = pathlib.Path(sys.argv[1]).resolve()
    out = pathlib.Path(sys.argv[2])
    for name in ("study", "csv", "las", "formula"):
        (out / name).mkdir(parents=True, exist_ok=True)
    files = [p for p in data_files(root, ["tests/data", "samples"]) if p.is_file()]
    for p in files:
        tag = str(p.relative_to(root)).replace("/", "_")
        if p.suffix == ".yaml":
            (out / "study" / tag).write_bytes(pack_study(p))
            for m in re.finditer(rb"^\s*formula:\s*([^|>\n][^\n]*)$", p.read_bytes(), re.M):
                (out / "formula" / (tag + ".formula")).write_bytes(m.group(1).strip().strip(b'"'))
        elif p.suffix == ".csv":
            (out / "csv" / tag).write_bytes(b"\x00" + p.read_bytes())
        elif p.suffix == ".las":
            (out / "las" / tag).write_bytes(p.read_bytes())
        elif p.suffix == ".dat" and "nist" in p.parts:
            f = formulas_from_nist(p)
            if f:
                (out / "formula" / tag).write_text(f)
    for name in ("study", "csv", "las", "formula"):
        print(f"pack_seeds: {name}: {len(list((out / name).iterdir()))} seeds")


if __name__ == "__main__":
    main()
