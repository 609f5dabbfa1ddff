#version 330 core
// The painted colour under a light like the model's, dimmed less so the map stays readable.
in vec3 v_view_pos;
in vec3 v_colour;
out vec4 o_colour;
void main() {
  vec3 n = normalize(cross(dFdx(v_view_pos), dFdy(v_view_pos)));
  vec3 to_eye = normalize(-v_view_pos);
  if (dot(n, to_eye) < 0.0) n = -n;
  vec3 key_dir = normalize(to_eye + vec3(-0.35, 0.45, 0.0));
  float key = max(dot(n, key_dir), 0.0);
  o_colour = vec4(v_colour * (0.45 + 0.55 * key), 1.0);
}
