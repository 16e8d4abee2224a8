~VERSION INFORMATION
 VERS.                  2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0
 WRAP.                  NO  : ONE LINE PER DEPTH STEP
~WELL INFORMATION BLOCK
# Every header value here is invented for the parser tests (well, field,
# companies, API codes, parameters); none is from a real well or from the
# LAS 2.0 standard's sample header.
#MNEM.UNIT      DATA TYPE           INFORMATION
#---------    -------------------   -------------------------------
 STRT.M                 1500.0000 : START DEPTH
 STOP.M                 1502.5000 : STOP DEPTH
 STEP.M                    0.5000 : STEP
 NULL.                  -999.2500 : NULL VALUE
 COMP.  BREVANNIC ENERGY (INVENTED) : COMPANY
 WELL.                  PALVORIN 7 : WELL
 FLD .                   QUELLODIN : FIELD
 LOC .      DEMO SITE B (INVENTED) : LOCATION
 PROV.                    INVENTED : PROVINCE
 SRVC.  TARRASENT WIRELINE (INV.) : SERVICE COMPANY
 DATE.                  13-MAR-2024 : LOG DATE
 UWI .                    INV-0007 : UNIQUE WELL ID
~CURVE INFORMATION
#MNEM.UNIT      API CODE            CURVE DESCRIPTION
#---------    -------------------   -------------------------------
 DEPT.M                             : 1  DEPTH
 GR  .GAPI       01 101 01 01       : 2  GAMMA RAY
 DT  .US/M       02 202 02 02       : 3  SONIC TRANSIT TIME
 RHOB.K/M3       03 303 03 03       : 4  BULK DENSITY
 NPHI.V/V        04 404 04 04       : 5  NEUTRON POROSITY
 PEF .B/E        05 505 05 05       : 6  PHOTOELECTRIC FACTOR
 CALI.MM         06 606 06 06       : 7  CALIPER
 RDEP.OHMM       07 707 07 07       : 8  DEEP RESISTIVITY
~PARAMETER INFORMATION
#MNEM.UNIT        VALUE             DESCRIPTION
#---------    -------------------   -------------------------------
 BHT .DEGC                 71.5000 : BOTTOM HOLE TEMPERATURE
 MDEN.K/M3               2650.0000 : MATRIX DENSITY
 RMF .OHMM                  0.3125 : MUD FILTRATE RESISTIVITY
~OTHER
 Invented demonstration data for parser tests.
 Values are not from any real well.
~A  DEPTH     GR       DT       RHOB      NPHI     PEF     CALI     RDEP
 1500.0000    78.4312   312.5000  2412.0000     0.2710     2.8100   216.3000     4.8125
 1500.5000    81.0250   318.2500  2398.5000     0.2845     2.7700   217.0000     4.2500
 1501.0000  -999.2500   301.7500  2431.2500     0.2515     2.9000   215.8000     6.1250
 1501.5000    64.5000   288.0000  2457.0000  -999.2500     2.9500   215.5000     9.8750
 1502.0000    59.1250   281.5000  2468.7500     0.2105     3.0200   215.4000    12.5000
 1502.5000    61.7500  -999.2500  2461.0000     0.2180  -999.2500   215.6000    11.0625
