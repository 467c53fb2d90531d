# The kill test runs the real `swathguard record` binary: build it before the tests.
add_dependencies(test_io swathguard)
# The import test of the demo captures runs the real simulator.
add_dependencies(test_io swathguard-sim)
