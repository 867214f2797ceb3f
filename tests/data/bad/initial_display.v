module m(CK, D, Q);
  input CK, D;
  output Q;
  reg q;
  initial $display("start");
  always @(posedge CK) q <= D;
  assign Q = q;
endmodule
