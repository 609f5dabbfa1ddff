#version 330 core
// Overlays (Mach plane, section outline): world positions, an optional pull towards the eye so
// lines on the surface win the depth test.
layout(location = 0) in vec3 a_pos;
uniform mat4 u_view;
uniform mat4 u_proj;
uniform float u_depth_pull;
void main() {
  vec4 p = u_proj * (u_view * vec4(a_pos, 1.0));
  p.z -= u_depth_pull * p.w;
  gl_Position = p;
}
