# Finds QuantLib from Debian's libquantlib0-dev (which ships a pkg-config file, no CMake config).
# Defines QuantLib_FOUND, QuantLib_VERSION and the imported target QuantLib::QuantLib.
find_package(PkgConfig QUIET)
if(PkgConfig_FOUND)
  pkg_check_modules(PC_QuantLib QUIET quantlib)
endif()

find_path(QuantLib_INCLUDE_DIR ql/quantlib.hpp HINTS ${PC_QuantLib_INCLUDE_DIRS})
find_library(QuantLib_LIBRARY NAMES QuantLib HINTS ${PC_QuantLib_LIBRARY_DIRS})
find_package(Boost 1.58 QUIET)          # QuantLib's headers include Boost headers

if(QuantLib_INCLUDE_DIR AND EXISTS "${QuantLib_INCLUDE_DIR}/ql/version.hpp")
  file(STRINGS "${QuantLib_INCLUDE_DIR}/ql/version.hpp" _ql_version_line
       REGEX "^#define QL_VERSION \"[^\"]+\"")
  string(REGEX REPLACE ".*\"([^\"]+)\".*" "\\1" QuantLib_VERSION "${_ql_version_line}")
endif()

include(FindPackageHandleStandardArgs)
find_package_handle_standard_args(QuantLib
  REQUIRED_VARS QuantLib_LIBRARY QuantLib_INCLUDE_DIR Boost_FOUND
  VERSION_VAR QuantLib_VERSION)

if(QuantLib_FOUND AND NOT TARGET QuantLib::QuantLib)
  add_library(QuantLib::QuantLib UNKNOWN IMPORTED)
  set_target_properties(QuantLib::QuantLib PROPERTIES
    IMPORTED_LOCATION "${QuantLib_LIBRARY}"
    INTERFACE_INCLUDE_DIRECTORIES "${QuantLib_INCLUDE_DIR};${Boost_INCLUDE_DIRS}")
endif()
mark_as_advanced(QuantLib_INCLUDE_DIR QuantLib_LIBRARY)
