// Invented demo data: the burner pattern of the fictional ring oven
// (samples/ring-oven.yaml), as the state it prepares from |00>:
// 0.354 |0> + 0.612 |1> + 0.354 |2> - 0.612 |3> (chamber j = q[0] + 2 q[1]).
OPENQASM 3.0;
include "stdgates.inc";
qubit[2] q;
ry(2*pi/3) q[0];
cx q[0], q[1];
h q[1];
