#version 330 core
// Flat shading from screen-space derivatives (no normal buffer: half the memory at 1M
// triangles), lit by a light that follows the camera plus a soft sky/ground term.
in vec3 v_view_pos;
uniform vec3 u_colour;
out vec4 o_colour;
void main() {
  vec3 n = normalize(cross(dFdx(v_view_pos), dFdy(v_view_pos)));
  vec3 to_eye = normalize(-v_view_pos);
  if (dot(n, to_eye) < 0.0) n = -n;  // two-sided: inverted shells still read as solid
  vec3 key_dir = normalize(to_eye + vec3(-0.35, 0.45, 0.0));
  float key = max(dot(n, key_dir), 0.0);
  float fill = 0.5 + 0.5 * n.y;
  float rim = pow(1.0 - max(dot(n, to_eye), 0.0), 3.0);
  vec3 c = u_colour * (0.20 + 0.62 * key + 0.18 * fill) + vec3(0.10, 0.12, 0.16) * rim;
  o_colour = vec4(c, 1.0);
}
