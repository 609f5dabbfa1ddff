#version 330 core
// Shaded model: positions only; the fragment shader derives the flat normal.
layout(location = 0) in vec3 a_pos;
uniform mat4 u_view;
uniform mat4 u_proj;
out vec3 v_view_pos;
void main() {
  vec4 p = u_view * vec4(a_pos, 1.0);
  v_view_pos = p.xyz;
  gl_Position = u_proj * p;
}
