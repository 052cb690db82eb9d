OPENQASM 3.0;
include "stdgates.inc";
// written by oraculum 0.1.0
// spec: vault-phase
// method: xag
// cost: qubits 12, toffoli 4, cnot 26, not 0, depth 18, toffoli depth 4, t-count 28
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
// gate g: argument k is line k above; the ancillae are arguments (a gate body cannot allocate) that enter at |0> and leave at |0>
gate g x_0, x_1, x_2, x_3, y_0, anc_0, anc_1, anc_2, anc_3, anc_4, anc_5, anc_6 {
  cx x_0, anc_0;
  cx x_1, anc_0;
  cx x_2, anc_1;
  cx anc_0, anc_1;
  cx x_3, anc_2;
  cx anc_1, anc_2;
  ccx x_0, anc_2, anc_3;
  cx anc_1, anc_4;
  cx anc_3, anc_4;
  cx x_1, anc_5;
  cx x_3, anc_5;
  ccx anc_4, anc_5, anc_6;
  cx x_0, y_0;
  cx x_1, y_0;
  cx x_2, y_0;
  cx x_3, y_0;
  cx anc_3, y_0;
  cx anc_6, y_0;
  ccx anc_4, anc_5, anc_6;
  cx x_3, anc_5;
  cx x_1, anc_5;
  cx anc_3, anc_4;
  cx anc_1, anc_4;
  ccx x_0, anc_2, anc_3;
  cx anc_1, anc_2;
  cx x_3, anc_2;
  cx anc_0, anc_1;
  cx x_2, anc_1;
  cx x_1, anc_0;
  cx x_0, anc_0;
}
qubit[4] x_;
qubit[1] y_;
qubit[7] anc;
x y_[0];
h y_[0];
g x_[0], x_[1], x_[2], x_[3], y_[0], anc[0], anc[1], anc[2], anc[3], anc[4], anc[5], anc[6];
h y_[0];
x y_[0];
