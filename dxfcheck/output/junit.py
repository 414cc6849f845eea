"""Output: the release gate as JUnit XML (``check --junit FILE``), one test
case per rule, for CI servers."""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

from dxfcheck.core.textsafe import xml_text
from dxfcheck.gate.rules import Judgement, RuleResult, Verdict
from dxfcheck.gate.verdicts import figures
from dxfcheck.output.terminal import format_value
from dxfcheck.output.text import CAUTION

__all__ = ["junit_xml"]

#: The XML declaration the document starts with.
XML_DECLARATION = '<?xml version="1.0" encoding="UTF-8"?>\n'


def _rule_text(r: RuleResult) -> str:
    """A rule's value, limit, margin, message and source in one line."""
    n = figures(r.value, r.limit)
    return (
        f"value {format_value(r.value, r.unit, n)}, limit {format_value(r.limit, r.unit, n)}, "
        f"margin {format_value(r.margin)}; {r.message} [{r.source}]"
    )


def _add_case(suite: ET.Element, r: RuleResult, name: str, failing: set[Verdict]) -> None:
    """One rule as a test case: fail -> failure, skip -> skipped, else its
    verdict on system-out."""
    case = ET.SubElement(suite, "testcase", classname=f"dxfcheck.{name}", name=f"{r.rule}: {r.title}")
    text = _rule_text(r)
    if r.verdict in failing:
        ET.SubElement(case, "failure", message=f"{r.verdict}: {r.title}").text = text
    elif r.verdict is Verdict.SKIP:
        ET.SubElement(case, "skipped", message=r.message)
    else:
        ET.SubElement(case, "system-out").text = f"{r.verdict}: {text}"


def junit_xml(j: Judgement, *, strict: bool = False) -> str:
    """JUnit XML with one test case per rule (fail -> failure, skip ->
    skipped; warnings are failures under ``strict``)."""
    name = Path(j.mechanism.drawing.path).name
    failing = {Verdict.FAIL, Verdict.WARN} if strict else {Verdict.FAIL}
    suites = ET.Element("testsuites", name="dxfcheck check")
    suite = ET.SubElement(
        suites,
        "testsuite",
        name=f"dxfcheck check {name}",
        tests=str(len(j.rules)),
        failures=str(sum(r.verdict in failing for r in j.rules)),
        skipped=str(sum(r.verdict is Verdict.SKIP for r in j.rules)),
        errors="0",
    )
    for r in j.rules:
        _add_case(suite, r, name, failing)
    ET.SubElement(suite, "system-out").text = CAUTION
    # ElementTree escapes < & and quotes; characters XML 1.0 forbids (from drawing texts) become visible escapes
    return XML_DECLARATION + xml_text(ET.tostring(suites, encoding="unicode")) + "\n"
