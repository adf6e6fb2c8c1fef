package spec

import _ "embed"

//go:embed demo.toml
var demoSpec []byte

// DemoStory introduces the demo's scenario (invented) on the terminal.
const DemoStory = `fringe demo (an invented scenario)
A four-person group at a photonics institute is deciding whether the
interference classifier deserves a workshop paper. Before booking device time
they compare its exact (infinite-shot, noiseless) form with classical
baselines on three open datasets and two invented ones (a glass-recycling
colour sorter and a bearing-vibration monitor), under 10-fold stratified
cross-validation repeated three times. Both forms of the classifier run side
by side, the published one (uniform index weights) and the class-balanced
one, with and without centring before normalisation, so the class-size bias
of the plain form is visible; the balanced form also runs as a device
would, with 32 to 2048 shots and post-selection, and with 512 shots under
a global depolarizing channel of strength 0.1 and 0.3. std+lift keeps
each vector's norm as one more amplitude.
`

// Demo returns the built-in demo experiment.
func Demo() (*Spec, error) {
	return Parse("demo.toml (built in)", demoSpec)
}
