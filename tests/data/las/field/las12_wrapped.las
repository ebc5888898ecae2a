# Invented well for tests: not real data (porofit LAS 1.2 fixture, wrapped).
~VERSION INFORMATION
 VERS.                          1.2:   CWLS LOG ASCII STANDARD -VERSION 1.2
 WRAP.                          YES:   MULTIPLE LINES PER DEPTH STEP
~WELL INFORMATION BLOCK
 STRT.M        1000.0000:
 STOP.M        1002.0000:
 STEP.M           0.5000:
 NULL.         -999.2500:
 COMP.             COMPANY:   INVENTED OIL CO. LTD.
 WELL.                WELL:   INVENTED 12-1
~CURVE INFORMATION BLOCK
 DEPT.M                     :   1  DEPTH
 GR  .GAPI     45 310 01 00 :   2  GAMMA RAY
 RHOB.G/C3     45 350 02 00 :   3  BULK DENSITY
 NPHI.V/V      42 890 00 00 :   4  NEUTRON POROSITY
~A
 1000.000
   55.10   2.3000
   0.210
 1000.500
   60.20   2.3500   0.205
 1001.000
   58.00   2.4000   0.190
 1001.500
   62.40
   2.3800   0.200
 1002.000
   57.90   2.4200   0.185
