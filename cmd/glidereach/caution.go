package main

import "glidereach/reach"

// cautionText is printed by every command that produces a result.
const cautionText = reach.Caution
