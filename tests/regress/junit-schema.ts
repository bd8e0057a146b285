// Test helper: validates JUnit XML against tests/fixtures/junit/junit.xsd with libxml2 (WASM build).

import { fileURLToPath } from "node:url";
import { schemaErrorsFor } from "../support/xsd.js";

/** Validation errors of `xml` against our JUnit schema: an empty array when the document is valid. */
export const junitSchemaErrors = schemaErrorsFor(fileURLToPath(new URL("../fixtures/junit/junit.xsd", import.meta.url)));
