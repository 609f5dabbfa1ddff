#version 330 core
// Triangles painted with a colour per corner (the drag sensitivity): world positions and
// colours, pulled slightly towards the eye so the paint wins over the model it lies on.
layout(location = 0) in vec3 a_pos;
layout(location = 1) in vec3 a_colour;
uniform mat4 u_view;
uniform mat4 u_proj;
uniform float u_depth_pull;
out vec3 v_view_pos;
out vec3 v_colour;
void main() {
  vec4 p = u_view * vec4(a_pos, 1.0);
  v_view_pos = p.xyz;
  v_colour = a_colour;
  gl_Position = u_proj * p;
  gl_Position.z -= u_depth_pull * gl_Position.w;
}
