# hypsolevLapacke.cmake - LAPACKE as the imported target hypsolev::lapacke,
# for the build and for an installed hypsolevConfig.cmake (installed beside
# it). LAPACKE ships no CMake package on Debian (liblapacke-dev has only
# lapacke.h, the library and lapacke.pc), so it is found by its header and
# library. An imported target keeps the absolute path of this machine's
# library out of the exported hypsolevTargets*.cmake: the client's own
# find_library fills it in. Leaves the target undefined when either is not
# found; the caller decides whether that is an error.
if(NOT TARGET hypsolev::lapacke)
  find_path(LAPACKE_INCLUDE_DIR lapacke.h)
  find_library(LAPACKE_LIBRARY lapacke)
  if(LAPACKE_INCLUDE_DIR AND LAPACKE_LIBRARY)
    add_library(hypsolev::lapacke UNKNOWN IMPORTED)
    set_target_properties(hypsolev::lapacke PROPERTIES
      IMPORTED_LOCATION "${LAPACKE_LIBRARY}"
      INTERFACE_INCLUDE_DIRECTORIES "${LAPACKE_INCLUDE_DIR}")
  endif()
endif()
