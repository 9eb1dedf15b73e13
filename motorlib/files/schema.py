"""Locates the motor-record XSD shipped in ``data_schema/``, compiles it once, validates trees.

The only module that knows where the schema files live.
"""

from __future__ import annotations

import functools
from pathlib import Path
from typing import Final

from lxml import etree

from ..errors import SchemaValidationError
from .bundled import bundled_dir

__all__ = ["MOTOR_RECORD_NAMESPACE", "MOTOR_RECORD_XSD", "schema_path", "validate"]

MOTOR_RECORD_NAMESPACE: Final = "urn:x-motorlib:motor-record:1"
MOTOR_RECORD_XSD: Final = "motor-record-1.xsd"


def schema_path(name: str = MOTOR_RECORD_XSD) -> Path:
    """Path of a schema file: installed beside this module (``motorlib/data_schema``) or in a source checkout."""
    return bundled_dir("data_schema", must_contain=name) / name


@functools.cache
def _motor_record_schema() -> etree.XMLSchema:
    # The XSD is our own file: parse it with a parser that also refuses network access.
    parser = etree.XMLParser(resolve_entities=False, no_network=True, load_dtd=False)
    return etree.XMLSchema(etree.parse(str(schema_path()), parser))


def validate(tree: etree._ElementTree, source: str) -> None:
    """Validate ``tree`` against the motor-record XSD.

    Raises
    ------
    SchemaValidationError
        With the line and the element path of the first violation.
    """
    schema = _motor_record_schema()
    if not schema.validate(tree):
        entry = schema.error_log[0]
        message = entry.message.replace("{" + MOTOR_RECORD_NAMESPACE + "}", "")
        raise SchemaValidationError(source, message, field=_element_path(tree, entry.path), line=entry.line)


def _element_path(tree: etree._ElementTree, xpath: str | None) -> str | None:
    """Readable path of the offending element, e.g. ``/motor-record/hardware/diameter``.

    lxml reports namespaced nodes as ``/*/*[2]/*``; evaluating that XPath finds the
    element, whose ancestors give the names.
    """
    if not xpath:
        return None
    try:
        nodes = tree.xpath(xpath)
    except etree.XPathError:
        return xpath
    if not nodes or not isinstance(nodes[0], etree._Element):
        return xpath
    element = nodes[0]
    names = [etree.QName(element).localname] + [etree.QName(a).localname for a in element.iterancestors()]
    return "/" + "/".join(reversed(names))
