OPENQASM 3.0;
include "stdgates.inc";
// written by oraculum 0.1.0
// spec: crew-quorum
// method: structural
// cost: qubits 4, toffoli 0, cnot 1, not 0, depth 1, toffoli depth 0, t-count 0
// the gates below are not lowered (ctrl(k) @ x); the cost is of the lowered circuit
// registers whose names OpenQASM 3 reserves carry a trailing '_' (x_, y_, ctrl_)
// phase oracle: y_[0] is prepared in |-> (x, h) and restored, so the gates between apply (-1)^f(x)
// lines:
//   a[0] = a0 (input)
//   a[1] = a1 (input)
//   a[2] = a2 (input)
//   y_[0] = y0 (output)
qubit[3] a;
qubit[1] y_;
x y_[0];
h y_[0];
cx a[2], y_[0];
h y_[0];
x y_[0];
