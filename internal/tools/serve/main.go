// Command serve serves a directory (the built page) on 127.0.0.1 for a browser on this machine.
package main

import (
	"flag"
	"fmt"
	"net"
	"net/http"
	"os"
	"strconv"
)

func main() {
	port := flag.Int("port", 8080, "TCP port on 127.0.0.1 (1-65535)")
	dir := flag.String("dir", "dist", "directory to serve")
	flag.Parse()
	if *port < 1 || *port > 65535 {
		fmt.Fprintf(os.Stderr, "serve: port: %d is outside 1..65535\n", *port)
		os.Exit(2)
	}
	addr := net.JoinHostPort("127.0.0.1", strconv.Itoa(*port))
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		fmt.Fprintln(os.Stderr, "serve:", err)
		os.Exit(1)
	}
	fmt.Printf("serving %s at http://%s/hdrisk.html (Ctrl-C stops)\n", *dir, addr)
	if err := http.Serve(ln, http.FileServer(http.Dir(*dir))); err != nil {
		fmt.Fprintln(os.Stderr, "serve:", err)
		os.Exit(1)
	}
}
