//! Reading and writing mzML 1.1 (HUPO-PSI; Martens et al., Mol. Cell. Proteomics 10(1),
//! R110.000133, 2011).

pub mod binary;
pub mod numpress;
