# Runs one safesite command and checks its exit status and output (CTest label "cli").
#   cmake -DEXE=<safesite> -DARGS="a|b|c" -DSTATUS=<n> [-DSTDOUT=<regex>] [-DSTDERR=<regex>]
#         [-DFILES="dir/a.csv|dir/b.csv"] [-DREMOVE="dir/c.html"] [-DWORKDIR=<dir>]
#         -P expect.cmake
# ARGS, FILES and REMOVE use '|' as separator (';' would be split by add_test). REMOVE names
# files deleted before the run, so that FILES shows the run wrote them anew.
string(REPLACE "|" ";" args "${ARGS}")
if(DEFINED REMOVE)
  string(REPLACE "|" ";" remove "${REMOVE}")
  file(REMOVE ${remove})
endif()
if(NOT DEFINED WORKDIR)
  set(WORKDIR ".")
endif()
execute_process(COMMAND "${EXE}" ${args}
                WORKING_DIRECTORY "${WORKDIR}"
                RESULT_VARIABLE status OUTPUT_VARIABLE out ERROR_VARIABLE err)
if(NOT status EQUAL STATUS)
  message(FATAL_ERROR "exit status ${status}, expected ${STATUS}\nstdout:\n${out}\nstderr:\n${err}")
endif()
if(DEFINED STDOUT AND NOT out MATCHES "${STDOUT}")
  message(FATAL_ERROR "stdout does not match '${STDOUT}':\n${out}")
endif()
if(DEFINED STDERR AND NOT err MATCHES "${STDERR}")
  message(FATAL_ERROR "stderr does not match '${STDERR}':\n${err}")
endif()
if(DEFINED FILES)
  string(REPLACE "|" ";" files "${FILES}")
  foreach(f IN LISTS files)
    if(NOT EXISTS "${f}")
      message(FATAL_ERROR "expected file ${f} was not written")
    endif()
  endforeach()
endif()
