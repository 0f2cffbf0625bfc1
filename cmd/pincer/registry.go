package main

import (
	"pincer/instances"
	"pincer/instances/cflp"
	"pincer/instances/gap"
	"pincer/instances/lotsizing"
	"pincer/instances/scheduling"
)

// registry lists the families the command line offers. It is the only file
// of the command line that names a family package: adding a family is a new
// package plus one entry here.
func registry() []instances.Family {
	return []instances.Family{gap.Family{}, cflp.Family{}, lotsizing.Family{}, scheduling.Family{}}
}
