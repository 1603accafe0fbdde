"""Citations and cross-references resolve inside the repository.

Code comments and tests cite facts as `references.md#ANCHOR`; each anchor must be a heading of
docs/references.md (GitHub's heading slugs). Relative links in the Markdown docs must name files
that exist, and nothing may cite a document outside the repository by section number.
"""

import pathlib
import re
import subprocess

REPO = pathlib.Path(__file__).resolve().parents[2]


def tracked_text_files():
    out = subprocess.run(
        ["git", "ls-files", "-co", "--exclude-standard"], cwd=REPO, capture_output=True, text=True, check=True
    ).stdout.split("\n")
    for name in out:
        path = REPO / name
        if not name or not path.is_file() or path.suffix in {".npy", ".bin", ".png", ".lock", ".pack"}:
            continue
        try:
            yield name, path.read_text(encoding="utf-8")
        except UnicodeDecodeError:
            continue


def slug(heading):
    # GitHub's rule for heading anchors: lower case, drop punctuation but hyphens, spaces to hyphens.
    s = heading.strip().lower()
    s = re.sub(r"[^\w\- ]", "", s)
    return s.replace(" ", "-")


def anchors(md_text):
    return {slug(m.group(1)) for m in re.finditer(r"^#+\s+(.*)$", md_text, re.M)}


def test_every_reference_anchor_resolves():
    known = anchors((REPO / "docs" / "references.md").read_text(encoding="utf-8"))
    missing = []
    cited = 0
    for name, text in tracked_text_files():
        for k, line in enumerate(text.split("\n"), 1):
            for m in re.finditer(r"references\.md#([a-z0-9][a-z0-9\-]*)", line):
                cited += 1
                if m.group(1) not in known:
                    missing.append(f"{name}:{k}: #{m.group(1)}")
    assert cited > 10, "the citations were not found at all: the scan is broken"
    assert not missing, "citations with no anchor in docs/references.md:\n" + "\n".join(missing)


def test_no_citation_points_outside_the_repository():
    bad = []
    for name, text in tracked_text_files():
        if name == "tests/python/test_tidy.py":
            continue
        for k, line in enumerate(text.split("\n"), 1):
            if re.search(r"constructions\.md\s*§", line):
                bad.append(f"{name}:{k}")
    assert not bad, "citations of a section of a document outside the repository:\n" + "\n".join(bad)


def test_relative_links_in_the_docs_name_existing_files():
    broken = []
    for name, text in tracked_text_files():
        if not name.endswith(".md"):
            continue
        base = (REPO / name).parent
        for m in re.finditer(r"\]\(([^)#\s]+)(#[^)]*)?\)", text):
            target = m.group(1)
            if re.match(r"^[a-z]+:", target):
                continue
            if not (base / target).exists():
                broken.append(f"{name}: {target}")
    assert not broken, "links to files that do not exist:\n" + "\n".join(broken)


def test_seed_files_point_to_a_grammar_that_exists():
    for path in (REPO / "seed-catalogue" / "sequences").glob("*.txt"):
        text = path.read_text(encoding="utf-8")
        if "seed-catalogue/README.md" in text:
            assert (REPO / "seed-catalogue" / "README.md").is_file(), path.name
