// Step 1 of the world coastline conversion (see README.md): Natural Earth 1:10m land (TopoJSON, npm world-atlas 2.0.2)
// → GeoJSON FeatureCollection, using topojson-client's feature().
import { readFileSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
const require = createRequire(process.cwd() + "/");
const { feature } = require("topojson-client");
const [input, output] = process.argv.slice(2);
const topo = JSON.parse(readFileSync(input, "utf8"));
writeFileSync(output, JSON.stringify(feature(topo, topo.objects.land)));
