package main

import (
	"flag"
	"strings"

	"fringe/bench/assess"
	"fringe/qkernel/device"
)

// assessDeviceFlags defines the device flags of fringe assess.
func assessDeviceFlags(fs *flag.FlagSet) (name *string, instances *int) {
	name = fs.String("device", "", "also assess every circuit on the device `NAME|FILE` (embedded: "+strings.Join(device.Names(), ", ")+"; or a device file): routed counts, duration, noise budget and fidelity, and the accuracy under its calibrated noise for the -subsets sizes, simulated")
	instances = fs.Int("device-instances", assess.DefaultDeviceInstances, "with -device: test instances simulated per dataset, pipeline and subset size (from the first repeat's test parts, the classes in their proportions, round the folds)")
	return name, instances
}

// setAssessDevice loads the device of -device into opt and checks
// -device-instances.
func setAssessDevice(fs *flag.FlagSet, opt *assess.Options, name string, instances int) error {
	set := false
	fs.Visit(func(f *flag.Flag) { set = set || f.Name == "device-instances" })
	if name == "" {
		if set {
			return usagef("-device-instances applies with -device only")
		}
		return nil
	}
	if instances < 1 {
		return usagef("-device-instances must be at least 1, got %d", instances)
	}
	dev, err := loadDevice(name)
	if err != nil {
		return err
	}
	opt.Device, opt.DeviceInstances = dev, instances
	return nil
}
