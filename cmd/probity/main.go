// Command probity plans, draws and judges labeling audits of a deployed
// classifier's error rate, and issues the signed acceptance record.
package main

import "os"

func main() {
	os.Exit(run(os.Args[1:], systemDeps()))
}
