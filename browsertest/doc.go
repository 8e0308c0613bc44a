// Package browsertest opens the built page (dist/hdrisk.html) from file:// in headless
// Chromium and checks the page hooks of contract 4: data-state, the headline figures, and that
// no network request of any kind is made. It needs ./build.sh build first (./build.sh test
// does that) and Debian's chromium; with CI=true a missing browser or page is a failure.
package browsertest
