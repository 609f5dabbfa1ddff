#version 330 core
uniform vec4 u_colour;
out vec4 o_colour;
void main() { o_colour = u_colour; }
