"use strict";
// Loads the inlined Go program: base64 -> gzip -> WebAssembly.Module, compiled once. The same
// module is later posted to the compute workers, which instantiate it without recompiling.
(async function () {
	performance.mark("hdrisk:boot");
	const root = document.getElementById("hdrisk");
	function fail(message) {
		root.setAttribute("data-state", "error");
		const p = document.createElement("p");
		p.className = "problem";
		p.textContent = message;
		root.replaceChildren(p);
	}
	try {
		if (typeof DecompressionStream !== "function" || typeof WebAssembly !== "object") {
			throw new Error("this browser lacks DecompressionStream or WebAssembly; use a current Chromium, Firefox or Safari");
		}
		const text = document.getElementById("hdrisk-wasm").textContent;
		let packed;
		if (typeof Uint8Array.fromBase64 === "function") {
			packed = Uint8Array.fromBase64(text);
		} else {
			const s = atob(text);
			packed = new Uint8Array(s.length);
			for (let i = 0; i < s.length; i++) packed[i] = s.charCodeAt(i);
		}
		performance.mark("hdrisk:decoded");
		const stream = new Blob([packed]).stream().pipeThrough(new DecompressionStream("gzip"));
		// Streaming compilation overlaps decompressing and compiling; the Response is built
		// here from the stream, nothing is fetched.
		const module = await WebAssembly.compileStreaming(
			new Response(stream, { headers: { "Content-Type": "application/wasm" } }));
		performance.mark("hdrisk:compiled");

		// vugu's renderer passes its helper script to window.eval, which the page policy forbids.
		// The helper already ran as an inline script allowed by hash; accept exactly that text
		// and refuse any other.
		const helper = document.getElementById("hdrisk-vugu").textContent;
		window.eval = function (source) {
			if (source === helper) return undefined;
			throw new EvalError("hdrisk: eval is disabled by the page's security policy");
		};

		globalThis.hdriskBoot = {
			module: module,
			workerSource: document.getElementById("hdrisk-wasm-exec").textContent + "\n" +
				document.getElementById("hdrisk-worker").textContent,
			threads: Math.max(1, Math.min(16, navigator.hardwareConcurrency || 2)),
			started: performance.now(),
		};
		const go = new Go();
		const instance = await WebAssembly.instantiate(module, go.importObject);
		performance.mark("hdrisk:instantiated");
		go.run(instance).then(function () {
			if (root.isConnected && root.getAttribute("data-state") !== "error") {
				fail("The calculator stopped unexpectedly; reload the page.");
			}
		});
	} catch (err) {
		fail("The calculator could not start: " + (err && err.message ? err.message : String(err)));
	}
})();
