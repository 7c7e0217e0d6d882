// Entry of the bundled lane (dist/bundle/worker.js, next to the bundled CLI, where lane.ts looks for it).
import "./math.js";
import "../run/worker.js";
