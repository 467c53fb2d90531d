# test_inspect.cpp runs the swathguard executable: build it with the tests.
add_dependencies(${target} swathguard)
