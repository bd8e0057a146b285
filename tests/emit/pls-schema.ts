// Test helper: validates a PLS document against tests/fixtures/pls/pls.xsd with libxml2 (WASM build).

import { fileURLToPath } from "node:url";
import { XmlDocument } from "libxml2-wasm";
import { xmlRegisterFsInputProviders } from "libxml2-wasm/lib/nodejs.mjs";
import { schemaErrorsFor } from "../support/xsd.js";

xmlRegisterFsInputProviders();

/** Validation errors of `xml` against our PLS schema: an empty array when the document is valid. */
export const plsSchemaErrors = schemaErrorsFor(fileURLToPath(new URL("../fixtures/pls/pls.xsd", import.meta.url)));

/** Parses `xml` with libxml2 (throws XmlParseError when it is not well-formed). */
export function parseXml(xml: string): XmlDocument {
  return XmlDocument.fromString(xml);
}
