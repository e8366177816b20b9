#pragma once
// The intake screening as a section a committee reads (with --proposal):
// the recommendation and its reasons, the proposed model's timing and its
// failure patterns with the cheapest fix, the catalogue candidates with each
// matching criterion, which of their inputs the plan provides on time, and
// the cautions of DESIGN §8 in full. It renders an IntakeReport; every
// decision is made in intake/*.h.

#include <string>

#include "intake/intake.h"

namespace readyby::html {

/// Appends the section's content (the section heading is the page's).
void write_intake_section(std::string& out, const IntakeReport& report);

}  // namespace readyby::html
