# The loopback test runs the real `swathguard record` and `swathguard-sim` binaries.
add_dependencies(test_engine swathguard swathguard-sim)
