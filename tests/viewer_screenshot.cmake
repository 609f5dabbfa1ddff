# CTest driver of the viewer's screenshot mode: writes a small OBJ, renders a 1280x800 frame
# (under xvfb-run when XVFB_RUN is given, otherwise with DISPLAY unset: EGL surfaceless) and
# checks the PNG.  Variables: VIEWER, CHECK, WORK, [XVFB_RUN].
file(MAKE_DIRECTORY ${WORK})
set(obj ${WORK}/spindle.obj)
set(png ${WORK}/shot.png)
file(REMOVE ${png})
execute_process(COMMAND ${CHECK} obj ${obj} RESULT_VARIABLE rc)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "could not write ${obj}")
endif()
set(args --screenshot ${png} --mach 1.3 --roll 30 --size 1280x800 ${obj})
if(XVFB_RUN)
  execute_process(COMMAND ${XVFB_RUN} -a ${VIEWER} ${args} RESULT_VARIABLE rc)
else()
  execute_process(COMMAND ${CMAKE_COMMAND} -E env --unset=DISPLAY --unset=WAYLAND_DISPLAY ${VIEWER} ${args}
                  RESULT_VARIABLE rc)
endif()
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "machcut-view --screenshot exited with ${rc}")
endif()
execute_process(COMMAND ${CHECK} png ${png} 1280 800 RESULT_VARIABLE rc)
if(NOT rc EQUAL 0)
  message(FATAL_ERROR "screenshot check failed")
endif()

# Issue 13: "the viewer's --screenshot onto a device node: exit 0, and the device node is
# replaced by a regular file". A device is written in place (never replaced) and a failed write
# is a non-zero exit with one line naming it: /dev/full fails every write (full(4)).
if(EXISTS /dev/full AND NOT XVFB_RUN)
  execute_process(COMMAND ${CMAKE_COMMAND} -E env --unset=DISPLAY --unset=WAYLAND_DISPLAY ${VIEWER}
                          --screenshot /dev/full --size 320x240 ${obj}
                  RESULT_VARIABLE rc ERROR_VARIABLE err)
  if(rc EQUAL 0 OR NOT err MATCHES "/dev/full[^\n]*No space left on device")
    message(FATAL_ERROR "--screenshot /dev/full: exit ${rc}, stderr: ${err}")
  endif()
  if(IS_DIRECTORY /dev/full OR NOT EXISTS /dev/full)
    message(FATAL_ERROR "/dev/full is gone")
  endif()
  execute_process(COMMAND stat -c %F /dev/full OUTPUT_VARIABLE kind OUTPUT_STRIP_TRAILING_WHITESPACE)
  if(NOT kind STREQUAL "character special file")
    message(FATAL_ERROR "/dev/full is now a ${kind}")
  endif()
endif()
