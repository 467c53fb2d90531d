// The simulated seabed: depth below the sea surface as a smooth function of position (a planar
// gradient, straight ramps, straight channels and sand waves; see SeabedSpec). No tide.
#pragma once

#include "drivers_sim/scenario.hpp"

namespace sg::sim {

class Seabed {
public:
    explicit Seabed(SeabedSpec spec) : m_spec(std::move(spec)) {}
    // Water depth (metres, positive down) at a position relative to the origin (metres).
    double depth_m(Vec2 p) const;

private:
    SeabedSpec m_spec;
};

}  // namespace sg::sim
