// The umbrella header as C++23: lob::result is std::expected where the library has it.
#include <lob/lob.hpp>

static_assert(lob::version > 0);
