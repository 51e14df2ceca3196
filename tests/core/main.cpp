#define BOOST_TEST_MODULE lintel_core
#include <boost/test/unit_test.hpp>
