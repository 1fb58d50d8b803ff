~VERSION INFORMATION
 VERS.                  2.0 :   CWLS LOG ASCII STANDARD -VERSION 2.0
 WRAP.                  NO  :   ONE LINE PER DEPTH STEP
~WELL INFORMATION
#MNEM.UNIT              DATA                       DESCRIPTION
#----- -----            ----------               -------------------------
STRT    .M              1670.0000                :START DEPTH
STOP    .M              1671.0000                :STOP DEPTH
STEP    .M              0.2000                   :STEP
NULL    .               -999.25                  :NULL VALUE
COMP    .       GREYFELL PETROLEUM LTD           :COMPANY
WELL    .       HARROW DEEP 2                    :WELL
FLD     .       TARNWICK                         :FIELD
LOC     .       BLOCK 7 NORTH                    :LOCATION
SRVC    .       CORRIE LOGGING SERVICES          :SERVICE COMPANY
DATE    .       13-MAR-2021                      :LOG DATE
UWI     .       TW-0007-HD2                      :UNIQUE WELL ID
~CURVE INFORMATION
#MNEM.UNIT              API CODE                 CURVE DESCRIPTION
#----- -----            ----------               -------------------------
DEPT    .M                                       :  1  DEPTH
DT      .US/M           60 520 32 00             :  2  SONIC TRANSIT TIME
RHOB    .K/M3           45 350 01 00             :  3  BULK DENSITY
NPHI    .V/V            42 890 00 00             :  4  NEUTRON POROSITY
GR      .GAPI           45 310 01 00             :  5  GAMMA RAY
~PARAMETER INFORMATION
#MNEM.UNIT              VALUE             DESCRIPTION
#----- -----            -----             -----------
BHT     .DEGC           35.5000          :BOTTOM HOLE TEMPERATURE
BS      .MM             200.0000         :BIT SIZE
~A  DEPTH     DT       RHOB     NPHI      GR
1670.000   123.450 2550.000    0.450   81.250
1670.200   123.450 2550.000    0.450   81.250
1670.400   124.800 2549.750    0.438   79.003
1670.600   -999.25 2548.125    0.441   77.500
1670.800   126.125  -999.25  -999.25   76.125
1671.000   127.001 2551.500    0.437   75.875
