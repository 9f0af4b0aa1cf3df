# Finds FLINT with antic and Arb and defines the imported target zb::numbertheory.
# FLINT 2.x (Debian 12): <flint/...> + <antic/...> + top-level Arb headers (<acb.h>), libs flint, antic, flint-arb.
# FLINT 3.x: everything is in libflint, headers under <flint/...>; we then add <prefix>/include/flint to the
# include path so that <acb.h> and <antic/nf_elem.h>-style includes resolve through our compat header.
find_path(FLINT_INCLUDE_DIR flint/flint.h)
find_library(FLINT_LIBRARY NAMES flint)
find_library(GMP_LIBRARY NAMES gmp)
find_library(MPFR_LIBRARY NAMES mpfr)
find_path(ANTIC_INCLUDE_DIR antic/nf_elem.h)
find_library(ANTIC_LIBRARY NAMES antic)
find_path(ARB_INCLUDE_DIR acb.h PATH_SUFFIXES arb)
find_library(ARB_LIBRARY NAMES flint-arb arb)

include(FindPackageHandleStandardArgs)
find_package_handle_standard_args(NumberTheoryLibs REQUIRED_VARS FLINT_INCLUDE_DIR FLINT_LIBRARY GMP_LIBRARY MPFR_LIBRARY)

if(NumberTheoryLibs_FOUND AND NOT TARGET zb::numbertheory)
  add_library(zb::numbertheory INTERFACE IMPORTED)
  set(_libs ${FLINT_LIBRARY} ${MPFR_LIBRARY} ${GMP_LIBRARY})
  set(_incs ${FLINT_INCLUDE_DIR})
  if(ANTIC_LIBRARY AND ARB_LIBRARY)
    message(STATUS "zetabraid: FLINT 2.x layout (separate antic: ${ANTIC_LIBRARY}, Arb: ${ARB_LIBRARY})")
    set(_libs ${ANTIC_LIBRARY} ${ARB_LIBRARY} ${_libs})
    list(APPEND _incs ${ANTIC_INCLUDE_DIR} ${ARB_INCLUDE_DIR})
    set_property(TARGET zb::numbertheory PROPERTY INTERFACE_COMPILE_DEFINITIONS ZB_FLINT2=1)
  else()
    message(STATUS "zetabraid: FLINT 3 layout (antic and Arb merged into ${FLINT_LIBRARY})")
    list(APPEND _incs ${FLINT_INCLUDE_DIR}/flint)
    set_property(TARGET zb::numbertheory PROPERTY INTERFACE_COMPILE_DEFINITIONS ZB_FLINT3=1)
  endif()
  set_property(TARGET zb::numbertheory PROPERTY INTERFACE_LINK_LIBRARIES "${_libs}")
  set_property(TARGET zb::numbertheory PROPERTY INTERFACE_INCLUDE_DIRECTORIES "${_incs}")
endif()
