// Test helper: validates JUnit XML against tests/fixtures/junit/junit.xsd with libxml2 (WASM build).

import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { XmlDocument, XsdValidator, XmlValidateError } from "libxml2-wasm";

const XSD_PATH = fileURLToPath(new URL("../fixtures/junit/junit.xsd", import.meta.url));
let validator: XsdValidator | undefined;

/** Validation errors of `xml` against our JUnit schema: an empty array when the document is valid. */
export function junitSchemaErrors(xml: string): string[] {
  if (validator === undefined) {
    const doc = XmlDocument.fromString(readFileSync(XSD_PATH, "utf8"), { url: XSD_PATH });
    validator = XsdValidator.fromDoc(doc);
    doc.dispose();
  }
  const doc = XmlDocument.fromString(xml);
  try {
    validator.validate(doc);
    return [];
  } catch (err) {
    if (err instanceof XmlValidateError) return err.details.map((d) => `${d.line}: ${d.message.trim()}`);
    throw err;
  } finally {
    doc.dispose();
  }
}
