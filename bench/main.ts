// `npm run bench`: runs each bench section in turn. A section is a function that measures and
// prints its own figures; add a section by adding it to the list below.

import { benchFst } from "./fst.js";

const sections: readonly { readonly name: string; readonly run: () => unknown }[] = [
  { name: "fst", run: benchFst },
];

for (const section of sections) {
  await section.run();
  console.log("");
}
