# stdin_case.cmake - a rover read from standard input ("-"): runs the
# program with INPUT_FILE on its standard input and TMPDIR in the case's
# folder; checks the exit status, stderr, the golden table, and that the
# spooled copy is gone after the run, whether it succeeded or failed.
#   cmake -DEXE=... -DWORK=dir -DINPUT=file -DEXPECT_RC=n -DEXPECT_ERR=regex
#         -DARGS=a;b;c [-DGOLDEN=expected.csv -DGOLDEN_OUT=file] -P stdin_case.cmake
# In ARGS, @DATA@ is tests/data and @OUT@ the case's scratch folder.
cmake_minimum_required(VERSION 3.25)
include(${CMAKE_CURRENT_LIST_DIR}/case_common.cmake)
file(REMOVE_RECURSE "${WORK}")
file(MAKE_DIRECTORY "${WORK}/tmp")
hyp_case_args(args)
string(REPLACE "@DATA@" "${DATA}" INPUT "${INPUT}")
file(SHA256 "${INPUT}" before)
execute_process(COMMAND ${CMAKE_COMMAND} -E env TMPDIR=${WORK}/tmp "${EXE}" ${args}
  INPUT_FILE "${INPUT}" RESULT_VARIABLE rc OUTPUT_VARIABLE out ERROR_VARIABLE err TIMEOUT 120)
hyp_case_check_run("${rc}" "${err}")
file(SHA256 "${INPUT}" after)
if(NOT before STREQUAL after)
  message(FATAL_ERROR "input ${INPUT} changed")
endif()
file(GLOB_RECURSE left LIST_DIRECTORIES true "${WORK}/tmp/*")
if(left)
  message(FATAL_ERROR "the spooled copy of standard input was left behind: ${left}")
endif()
hyp_case_check_golden()
if(out MATCHES "${hyp_nanre}" OR err MATCHES "${hyp_nanre}")
  message(FATAL_ERROR "a non-finite number shown: \"${CMAKE_MATCH_0}\"")
endif()
