OPENQASM 3.0;
include "stdgates.inc";
// written by oraculum 0.1.0
// spec: vault-phase
// method: xag
// cost: qubits 12, toffoli 0, cnot 26, not 0, depth 18, toffoli depth 2, t-count 8
// fault-tolerant cost: temporary and 2 (4 T each), measured uncomputes 2 (no T), toffoli-equivalent 2
// registers whose names OpenQASM 3 reserves carry a trailing '_' (x_, y_, ctrl_)
// phase oracle: y_[0] is prepared in |-> (x, h) and restored, so the gates between apply (-1)^f(x)
// lines:
//   x_[0] = a0 (input)
//   x_[1] = a1 (input)
//   x_[2] = b0 (input)
//   x_[3] = b1 (input)
//   y_[0] = open (output)
//   anc[0] (ancilla, starts and ends at 0)
//   anc[1] (ancilla, starts and ends at 0)
//   anc[2] (ancilla, starts and ends at 0)
//   anc[3] (ancilla, starts and ends at 0)
//   anc[4] (ancilla, starts and ends at 0)
//   anc[5] (ancilla, starts and ends at 0)
//   anc[6] (ancilla, starts and ends at 0)
qubit[4] x_;
qubit[1] y_;
qubit[7] anc;
bit m;
x y_[0];
h y_[0];
cx x_[0], anc[0];
cx x_[1], anc[0];
cx x_[2], anc[1];
cx anc[0], anc[1];
cx x_[3], anc[2];
cx anc[1], anc[2];
ccx x_[0], anc[2], anc[3];
cx anc[1], anc[4];
cx anc[3], anc[4];
cx x_[1], anc[5];
cx x_[3], anc[5];
ccx anc[4], anc[5], anc[6];
cx x_[0], y_[0];
cx x_[1], y_[0];
cx x_[2], y_[0];
cx x_[3], y_[0];
cx anc[3], y_[0];
cx anc[6], y_[0];
h anc[6];
m = measure anc[6];
if (m) { cz anc[4], anc[5]; x anc[6]; }
cx x_[3], anc[5];
cx x_[1], anc[5];
cx anc[3], anc[4];
cx anc[1], anc[4];
h anc[3];
m = measure anc[3];
if (m) { cz x_[0], anc[2]; x anc[3]; }
cx anc[1], anc[2];
cx x_[3], anc[2];
cx anc[0], anc[1];
cx x_[2], anc[1];
cx x_[1], anc[0];
cx x_[0], anc[0];
h y_[0];
x y_[0];
