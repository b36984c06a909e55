"""kinetic: kinetic-theory thermal conductivity of solids."""
