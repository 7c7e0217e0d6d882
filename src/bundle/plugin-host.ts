// Entry of the bundled plugin host (dist/bundle/plugin-host.js, next to the bundled CLI, where contain.ts looks for it).
import "./math.js";
import "../review/plugin-host.js";
