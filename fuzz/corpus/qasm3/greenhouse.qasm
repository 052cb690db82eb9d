OPENQASM 3.0;
include "stdgates.inc";
// written by oraculum 0.1.0
// spec: greenhouse-vent
// method: esop
// cost: qubits 6, toffoli 5, cnot 3, not 4, depth 8, toffoli depth 5, t-count 35
// registers whose names OpenQASM 3 reserves carry a trailing '_' (x_, y_, ctrl_)
// lines:
//   x_[0] = hot (input)
//   x_[1] = humid (input)
//   x_[2] = night (input)
//   y_[0] = vent (output)
//   y_[1] = fan (output)
//   anc[0] (ancilla, starts and ends at 0)
qubit[3] x_;
qubit[2] y_;
qubit[1] anc;
x x_[1];
x x_[2];
ccx x_[0], x_[1], anc[0];
ccx x_[2], anc[0], y_[0];
ccx x_[2], anc[0], y_[1];
ccx x_[0], x_[1], anc[0];
x x_[1];
x x_[2];
ccx x_[0], x_[2], y_[1];
cx x_[1], y_[0];
cx x_[1], y_[1];
cx x_[2], y_[0];
