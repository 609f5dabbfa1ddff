# Writes the shader sources of SHADER_DIR into OUT as C++ string constants.
set(_out "// Generated from shaders/ by viewer/embed_shaders.cmake. Do not edit.\n")
string(APPEND _out "#include \"gl_render.h\"\nnamespace machcut::view {\n")
foreach(_pair "kModelVert;model.vert" "kModelFrag;model.frag" "kOverlayVert;overlay.vert" "kOverlayFrag;overlay.frag"
       "kPaintVert;paint.vert" "kPaintFrag;paint.frag")
  list(GET _pair 0 _name)
  list(GET _pair 1 _file)
  file(READ ${SHADER_DIR}/${_file} _src)
  string(APPEND _out "const char* const ${_name} = R\"glsl(${_src})glsl\";\n")
endforeach()
string(APPEND _out "}  // namespace machcut::view\n")
file(WRITE ${OUT} "${_out}")
