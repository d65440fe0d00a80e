// Command headroom estimates battery runtime and wasted capacity for small
// battery-powered products: cells, an input-protection element and the
// load's floor voltage. Run it with no arguments on a terminal for the
// interactive screen, or see "headroom help" for the headless commands.
package main

import "os"

func main() { os.Exit(run(os.Args[1:], os.Stdin, os.Stdout, os.Stderr)) }
