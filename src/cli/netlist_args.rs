//! Options every command that reads a netlist shares (format override, top
//! model, storage cells). Placeholder until the readers land.
