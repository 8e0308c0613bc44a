"use strict";
// Compute worker bootstrap. This text follows Go's wasm_exec.js in the worker's Blob. The page
// posts {type: "boot", module} once; the Go program then detects that there is no document,
// takes over onmessage and answers jobs.
self.onmessage = function (ev) {
	const m = ev.data;
	if (!m || m.type !== "boot") return;
	const go = new Go();
	WebAssembly.instantiate(m.module, go.importObject).then(function (instance) {
		return go.run(instance);
	}).then(function () {
		// The Go program serves jobs until the worker ends; when it returns, the runtime
		// stopped (out of memory or a fault): tell the page, which replaces the worker.
		self.postMessage(JSON.stringify({ type: "fatal", error: "its program stopped, most likely out of memory" }));
	}).catch(function (err) {
		self.postMessage(JSON.stringify({ type: "fatal", error: String(err && err.message ? err.message : err) }));
	});
};
