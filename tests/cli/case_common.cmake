# case_common.cmake - what the CLI case scripts (run_case.cmake,
# stdin_case.cmake) share; include()d by them, never run alone.

# ARGS with @DATA@ (tests/data) and @OUT@ (the case's scratch folder WORK)
# put in, into the variable named out_var.
function(hyp_case_args out_var)
  set(args "")
  foreach(a IN LISTS ARGS)
    string(REPLACE "@DATA@" "${DATA}" a "${a}")
    string(REPLACE "@OUT@" "${WORK}" a "${a}")
    list(APPEND args "${a}")
  endforeach()
  set(${out_var} "${args}" PARENT_SCOPE)
endfunction()

# Prints the run's exit status and stderr, then fails unless the status is
# EXPECT_RC and stderr matches the regular expression EXPECT_ERR.
function(hyp_case_check_run rc err)
  message("exit ${rc}\n--- stderr:\n${err}")
  if(NOT rc STREQUAL "${EXPECT_RC}")
    message(FATAL_ERROR "exit status ${rc}, expected ${EXPECT_RC}")
  endif()
  if(NOT err MATCHES "${EXPECT_ERR}")
    message(FATAL_ERROR "stderr does not match: ${EXPECT_ERR}")
  endif()
endfunction()

# With GOLDEN set: WORK/GOLDEN_OUT must equal GOLDEN byte for byte.
function(hyp_case_check_golden)
  if(GOLDEN)
    file(READ "${GOLDEN}" want)
    file(READ "${WORK}/${GOLDEN_OUT}" got)
    if(NOT want STREQUAL got)
      message(FATAL_ERROR "${GOLDEN_OUT} differs from ${GOLDEN}")
    endif()
  endif()
endfunction()

# A nan or inf shown as a number. A text the input holds, quoted in a
# message ("nan" as found), is the file's own: a double quote before it is
# allowed.
set(hyp_nanre "(^|[^A-Za-z0-9_\"])[-+]?([Nn][Aa][Nn]|[Ii][Nn][Ff]([Ii][Nn][Ii][Tt][Yy])?)([^A-Za-z0-9_]|$)")
