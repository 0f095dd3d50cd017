package impedancetest

import "whorl/impedance"

// Planar returns the model input of a case.
func (c PlanarCase) Planar() impedance.Planar {
	return impedance.Planar{Coil: c.Coil, LiftoffM: c.LiftoffM, Layers: c.Layers}
}
