// The one place where the screen's panels are registered, in drawing order. Adding a panel:
// write ui/<name>.cpp with a make<Name>() factory, declare it in panel.hpp, list it here.
#include "ui/panel.hpp"

namespace sg::ui {

std::vector<std::unique_ptr<Panel>> makePanels() {
    std::vector<std::unique_ptr<Panel>> p;
    p.push_back(makeToolbar());
    p.push_back(makePlanView());
    p.push_back(makeHelmPanel());
    p.push_back(makeTimePlots());
    p.push_back(makeAlarmsPanel());
    p.push_back(makeRunsPanel());
    p.push_back(makeProfilesPanel());
    p.push_back(makePicksPanel());
    p.push_back(makeReplayBar());
    p.push_back(makeStatusBar());
    p.push_back(makeAlarmBanner());  // last: drawn above everything
    return p;
}

}  // namespace sg::ui
