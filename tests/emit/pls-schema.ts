// Test helper: validates a PLS document against tests/fixtures/pls/pls.xsd with libxml2 (WASM build).

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { XmlDocument, XsdValidator, XmlValidateError } from "libxml2-wasm";
import { xmlRegisterFsInputProviders } from "libxml2-wasm/lib/nodejs.mjs";

xmlRegisterFsInputProviders();

const XSD_PATH = fileURLToPath(new URL("../fixtures/pls/pls.xsd", import.meta.url));
let validator: XsdValidator | undefined;

function schema(): XsdValidator {
  if (validator === undefined) {
    const doc = XmlDocument.fromString(readFileSync(XSD_PATH, "utf8"), { url: XSD_PATH });
    validator = XsdValidator.fromDoc(doc);
    doc.dispose();
  }
  return validator;
}

/** Validation errors of `xml` against our PLS schema: an empty array when the document is valid. */
export function plsSchemaErrors(xml: string): string[] {
  const doc = XmlDocument.fromString(xml);
  try {
    schema().validate(doc);
    return [];
  } catch (err) {
    if (err instanceof XmlValidateError) return err.details.map((d) => `${d.line}: ${d.message.trim()}`);
    throw err;
  } finally {
    doc.dispose();
  }
}

/** Parses `xml` with libxml2 (throws XmlParseError when it is not well-formed). */
export function parseXml(xml: string): XmlDocument {
  return XmlDocument.fromString(xml);
}
