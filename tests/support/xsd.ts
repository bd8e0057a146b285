// Test helper: XML Schema validation with libxml2 (WASM build); one validator per schema file,
// compiled on first use.

import { readFileSync } from "node:fs";
import { XmlDocument, XsdValidator, XmlValidateError } from "libxml2-wasm";

/** A function giving the validation errors of a document against the schema at `xsdPath` (empty when valid). */
export function schemaErrorsFor(xsdPath: string): (xml: string) => string[] {
  let validator: XsdValidator | undefined;
  return (xml: string): string[] => {
    if (validator === undefined) {
      const doc = XmlDocument.fromString(readFileSync(xsdPath, "utf8"), { url: xsdPath });
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
  };
}
