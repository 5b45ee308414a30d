"""The project explains itself: the design document exists, citations point into it, links resolve.

(common practice, no source: documentation that cites sections and files
must cite ones that exist.)
"""

from __future__ import annotations

import doctest
import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
DESIGN = ROOT / "docs" / "design.md"
TEXT_FILES = [
    p
    for pattern in ("cyclewright/**/*.py", "tests/*.py", "docs/*.md", "*.md", "benchmarks/**/*.py")
    for p in ROOT.glob(pattern)
]


def _sections() -> set[int]:
    return {int(m) for m in re.findall(r"^## (\d+)\. ", DESIGN.read_text(), flags=re.M)}


def test_design_document_has_its_sections():
    assert _sections() == set(range(1, 15))


def test_citations_point_to_existing_sections():
    cite = re.compile(r"design\.md\)?,? sections? (\d+)(?:-(\d+))?")
    found = 0
    for path in TEXT_FILES:
        for m in cite.finditer(path.read_text(encoding="utf-8")):
            found += 1
            for n in filter(None, m.groups()):
                assert int(n) in _sections(), f"{path.name}: section {n} does not exist"
    assert found >= 5


def test_no_reference_to_files_outside_the_repository():
    # the file name is assembled so that this test does not find itself
    banned = ["DESIGN" + ".md", "../" + "shared"]
    for path in TEXT_FILES:
        text = path.read_text(encoding="utf-8")
        for word in banned:
            assert word not in text, f"{path.relative_to(ROOT)} mentions {word}"


def test_markdown_links_resolve():
    link = re.compile(r"\]\(([^)#\s]+)(?:#[^)]*)?\)")
    for path in [*ROOT.glob("*.md"), *ROOT.glob("docs/*.md")]:
        for target in link.findall(path.read_text(encoding="utf-8")):
            if target.startswith(("http://", "https://", "mailto:")):
                continue
            assert (path.parent / target).exists(), f"{path.name}: broken link {target}"


def _doctest_blocks(text: str) -> list[str]:
    """The fenced code blocks of a Markdown page that are interactive sessions."""
    blocks, current = [], None
    for line in text.splitlines(keepends=True):
        if line.startswith("```"):
            if current is None:
                current = []
            else:
                blocks.append("".join(current))
                current = None
        elif current is not None:
            current.append(line)
    return [b for b in blocks if b.lstrip().startswith(">>>")]


@pytest.mark.slow
@pytest.mark.parametrize("page", ["census.md", "scan.md", "counting.md"])
def test_docs_examples_run(page, monkeypatch, tmp_path):
    # the pages' interactive examples are doctests: they run as written, new names included
    monkeypatch.chdir(tmp_path)
    blocks = _doctest_blocks((ROOT / "docs" / page).read_text(encoding="utf-8"))
    assert blocks
    parser = doctest.DocTestParser()
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    for i, block in enumerate(blocks):
        test = parser.get_doctest(block, {}, f"{page}#{i}", page, 0)
        runner.run(test)
    assert runner.failures == 0
