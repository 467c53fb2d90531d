# The command-line tests (test_site.cpp) run the real `swathguard-sim` binary.
add_dependencies(test_sim swathguard-sim)
