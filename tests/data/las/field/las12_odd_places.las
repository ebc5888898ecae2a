# Invented well for tests: not real data (text LAS 1.2 writers put in odd places).
~VERSION INFORMATION
 VERS.                          1.2:   CWLS LOG ASCII STANDARD -VERSION 1.2
 WRAP.                          NO:   ONE LINE PER DEPTH STEP
~WELL INFORMATION BLOCK
 STRT.M                   :  1000.0000
 STOP.M        1002.0000
 STEP.M           0.5000:
 NULL.                    :  -999.2500
 COMP              COMPANY:   INVENTED OIL CO. LTD.
 WELL.                WELL:   INVENTED 12-2
~CURVE INFORMATION BLOCK
 DEPT. M                    :   1  DEPTH
 RHOB. GM/CC                :   2  BULK DENSITY
~OTHER
 invented remarks
~OTHER
 a second remarks section
~A  DEPTH     RHOB
 1000.000   2.3000
 1000.500   -999.2500
 1001.000   2.4000
 1001.500   2.3800
 1002.000   2.4200
