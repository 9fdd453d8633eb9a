# run_case.cmake - one CLI golden case: runs the program, checks the exit
# status and that stderr matches a regular expression; checks that no input
# changed and that a failing run leaves no output and no temporary file
# (exit status 3, a failed test of the data, writes its outputs).
#   cmake -DEXE=... -DWORK=dir -DEXPECT_RC=n -DEXPECT_ERR=regex
#         -DARGS=a;b;c [-DINPUTS=f1;f2] [-DGOLDEN=expected.csv -DGOLDEN_OUT=file]
#         [-DPROJ_DB_ONLY=/path/proj.db] (run with every PROJ grid missing)
#         -P run_case.cmake
# In ARGS, @DATA@ is tests/data and @OUT@ the case's scratch folder.
cmake_minimum_required(VERSION 3.25)
include(${CMAKE_CURRENT_LIST_DIR}/case_common.cmake)
file(REMOVE_RECURSE "${WORK}")
file(MAKE_DIRECTORY "${WORK}")
hyp_case_args(args)
set(sums "")
foreach(f IN LISTS INPUTS)
  string(REPLACE "@DATA@" "${DATA}" f "${f}")
  file(SHA256 "${f}" h)
  list(APPEND sums "${h}")
endforeach()
set(envcmd "")
if(ENV)
  string(REPLACE "@OUT@" "${WORK}" ENV "${ENV}")
  set(envcmd ${CMAKE_COMMAND} -E env ${ENV})
endif()
if(PROJ_DB_ONLY)
  # a PROJ_DATA folder holding proj.db alone: every grid is missing
  file(MAKE_DIRECTORY "${WORK}/projdata")
  file(CREATE_LINK "${PROJ_DB_ONLY}" "${WORK}/projdata/proj.db" SYMBOLIC)
  set(envcmd ${CMAKE_COMMAND} -E env PROJ_DATA=${WORK}/projdata)
endif()
# HYP_VALGRIND=1 in the environment runs the program under valgrind's
# memcheck: any invalid access or definite leak is exit status 99.
set(vg "")
if(DEFINED ENV{HYP_VALGRIND} AND NOT "$ENV{HYP_VALGRIND}" STREQUAL "")
  set(vg valgrind -q --error-exitcode=99 --leak-check=full --errors-for-leak-kinds=definite)
endif()
execute_process(COMMAND ${envcmd} ${vg} "${EXE}" ${args}
  RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err TIMEOUT 120)
hyp_case_check_run("${rc}" "${err}")
if(EXPECT_OUT AND NOT out MATCHES "${EXPECT_OUT}")
  message(FATAL_ERROR "stdout does not match: ${EXPECT_OUT}\n--- stdout:\n${out}")
endif()
set(i 0)
foreach(f IN LISTS INPUTS)
  string(REPLACE "@DATA@" "${DATA}" f "${f}")
  file(SHA256 "${f}" h)
  list(GET sums ${i} h0)
  if(NOT h STREQUAL h0)
    message(FATAL_ERROR "input ${f} changed")
  endif()
  math(EXPR i "${i} + 1")
endforeach()
file(REMOVE_RECURSE "${WORK}/projdata")
file(GLOB left "${WORK}/*")
# exit status 3: the run completed and wrote its outputs, but a test of
# its data failed; any other failure leaves nothing behind
if(EXPECT_RC STREQUAL "3" AND NOT left)
  message(FATAL_ERROR "exit status 3 but no output written")
elseif(NOT EXPECT_RC STREQUAL "0" AND NOT EXPECT_RC STREQUAL "3" AND left)
  message(FATAL_ERROR "a failing run left files behind: ${left}")
endif()
file(GLOB tmps "${WORK}/*hyp-tmp-*" "${WORK}/*.tmp-*")
if(tmps)
  message(FATAL_ERROR "temporary files left behind: ${tmps}")
endif()
hyp_case_check_golden()
# No number shown to a user is ever nan or inf: not on stdout or stderr,
# not in any output file (hyp_nanre: case_common.cmake).
if(out MATCHES "${hyp_nanre}")
  message(FATAL_ERROR "stdout shows a non-finite number: \"${CMAKE_MATCH_0}\"\n--- stdout:\n${out}")
endif()
if(err MATCHES "${hyp_nanre}")
  message(FATAL_ERROR "stderr shows a non-finite number: \"${CMAKE_MATCH_0}\"")
endif()
file(GLOB_RECURSE outputs "${WORK}/*")
foreach(f IN LISTS outputs)
  file(READ "${f}" body)
  if(body MATCHES "${hyp_nanre}")
    message(FATAL_ERROR "${f} shows a non-finite number: \"${CMAKE_MATCH_0}\"")
  endif()
endforeach()
