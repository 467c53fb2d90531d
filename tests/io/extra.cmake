# The kill test runs the real `swathguard record` binary: build it before the tests.
add_dependencies(test_io swathguard)
