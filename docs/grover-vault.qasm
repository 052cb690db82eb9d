OPENQASM 3.0;
include "stdgates.inc";
// One Grover iteration over the toy vault of specs/vault-phase.toml (4 input
// bits, 6 of 16 combinations marked): oraculum reports 1 iteration and a
// success probability of 0.8438 (Boyer, Brassard, Hoyer, Tapp 1998).
//
// The oracle, as `oraculum synth specs/vault-phase.toml --format qasm3
// --as-gate vault_oracle` writes it: an xor oracle onto y_0, every ancilla an
// argument that enters and leaves at |0>.
gate vault_oracle x_0, x_1, x_2, x_3, y_0, anc_0, anc_1, anc_2, anc_3, anc_4, anc_5, anc_6 {
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
bit[4] result;
// The uniform superposition, and y_[0] in |-> so that the xor oracle
// applies (-1)^f(x).
h x_;
x y_[0];
h y_[0];
// The iteration: the oracle, then the diffusion (reflection about the
// uniform superposition: H, X, a 3-controlled Z, X, H).
vault_oracle x_[0], x_[1], x_[2], x_[3], y_[0], anc[0], anc[1], anc[2], anc[3], anc[4], anc[5], anc[6];
h x_;
x x_;
h x_[3];
ctrl(3) @ x x_[0], x_[1], x_[2], x_[3];
h x_[3];
x x_;
h x_;
// y_[0] back to |0>, and read the combination.
h y_[0];
x y_[0];
result = measure x_;
